"""layoutlang.testing in users' own Python tests: the comparison and the whole-script check."""

from __future__ import annotations

from pathlib import Path

import pytest

from layoutlang import loads
from layoutlang.testing import assert_quantity, assert_script, compare

# f = 50, s = 150 → s' = 75 (Hecht 2017, Optics, 5th ed., eq. 5.17).
SCRIPT = """object 150 before, height 2
start in air
lens relay focal length 50
stop at relay, diameter 10
image at focus
expect image distance = 75 ± 0.01
"""


def test_assert_quantity_message_shows_both_values_and_tolerance() -> None:
    assert_quantity(75.004, "=", 75, 0.01, unit="mm", quantity="image distance")
    with pytest.raises(AssertionError, match=r"image distance = 74 mm, expected 75 mm ± 0.01 mm"):
        assert_quantity(74.0, "=", 75, 0.01, unit="mm", quantity="image distance")
    assert compare(2.0, "<", 3.0).passed and not compare(4.0, "<", 3.0).passed


def test_assert_script_on_a_file_and_a_program(tmp_path: Path) -> None:
    path = tmp_path / "relay.lay"
    path.write_text(SCRIPT, encoding="utf-8")
    assert_script(path)
    assert_script(loads(SCRIPT))
    with pytest.raises(AssertionError) as caught:
        assert_script(loads(SCRIPT.replace("= 75 ± 0.01", "= 70 ± 0.01"), "bad.lay"))
    message = str(caught.value)
    assert "1 expectation(s) of bad.lay do not hold" in message
    assert "bad.lay:6: expect image distance = 70 ± 0.01" in message
    assert "expected 70 mm ± 0.01 mm; off by 5 mm" in message
