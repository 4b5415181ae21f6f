"""The usual cautions printed with layouts that can hurt someone (declared with `hazard`)."""

from __future__ import annotations

__all__ = ["CAUTIONS", "GENERAL"]

GENERAL = ("layoutlang is no substitute for licensed practice: follow your local codes and "
           "have the design reviewed by a qualified professional.")

CAUTIONS = {
    "laser": ("CAUTION: this layout focuses or relays laser light. A focused beam can burn skin "
              "and blind instantly, also by stray reflections. Follow your local laser-safety "
              "code (classification, eyewear, beam enclosures) and your laser safety officer."),
    "eye": ("CAUTION: this layout models or illuminates a human eye. Exposure limits and any "
            "clinical use are governed by local codes and licensed practice; do not rely on "
            "these numbers for treatment or exposure decisions."),
    "sunlight": ("CAUTION: this layout can concentrate sunlight. A burning-glass focus ignites "
                 "material and blinds anyone looking through it at the sun. Keep covers on, "
                 "never view the sun without a certified filter, and follow local codes."),
}
