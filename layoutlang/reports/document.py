"""Design-report documents (Markdown, HTML, LaTeX): the layout table, first-order report,
expectations with their status, derived equations where the script has them, and the drawing.

The content is gathered once into plain rows (`Sections`) and written by one small writer per
format, so the three documents always say the same thing. Same script, same bytes.
"""

from __future__ import annotations

import base64
import html
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..checks import CheckResult
from ..engines.firstorder import FirstOrder
from ..interpret.interpreter import Program
from ..system import System
from ..testing import format_number
from .blocks import Block, Heading, Line, Table
from .text import (LAYOUT_HEADINGS, SIGN_CONVENTION, first_order_rows, layout_rows,
                   requested_blocks)
from ..guard import guarded

__all__ = ["Sections", "Document", "gather", "render_document", "markdown", "html_document",
           "latex_document"]

@dataclass
class Sections:
    """Everything a report says, as plain text rows."""

    title: str
    file: str
    units: str
    layout: list[list[str]]
    setting: list[str]
    first_order: list[list[str]]
    notes: list[str]
    expectations: list[list[str]]  # status, line, statement, message
    equations: list[tuple[str, str, str]] = field(default_factory=list)  # name, text, latex
    cautions: list[str] = field(default_factory=list)
    #: the sections the script asked for, as the text report prints them (blocks.py)
    requested: list[Block] = field(default_factory=list)

    @property
    def all_hold(self) -> bool:
        return all(row[0] == "holds" for row in self.expectations)

    @property
    def summary(self) -> str:
        """Pass or fail in one sentence, for the top of the document."""
        total = len(self.expectations)
        if not total:
            return "The script states no expectations."
        failed = [row[1] for row in self.expectations if row[0] != "holds"]
        if not failed:
            return f"All {total} expectations hold." if total > 1 else "The expectation holds."
        where = ", ".join(failed)
        return (f"{len(failed)} of {total} expectations FAIL (line{'s' if len(failed) > 1 else ''}"
                f" {where}).")


@dataclass(frozen=True)
class Document:
    text: str
    all_hold: bool


def _length(value: Any, units: str) -> str:
    return f"{format_number(value)} {units}"


def setting_lines(system: System) -> list[str]:
    """The object, stop, image plane and wavelengths in words (as the text report says them)."""
    from .text import setting_lines as text_lines

    return [line.strip() for line in text_lines(system)]


def _equations(program: Program) -> list[tuple[str, str, str]]:
    """(quantity, plain text, LaTeX) of each closed form the script derives; the symbolic
    engine (and sympy) is imported only for a script that declares symbols."""
    if getattr(program, "symbolic", None) is None:
        return []
    try:
        from ..symbolic.render import equation_rows
    except ImportError:  # an install without the symbolic engine: no equations section
        return []
    return list(equation_rows(program))


def gather(program: Program, results: FirstOrder, checked: list[CheckResult]) -> Sections:
    """Collect a report's content from an evaluated program."""
    from ..hazards import CAUTIONS, GENERAL

    system = program.system
    units = system.units
    first = first_order_rows(results, units)
    expectations = [["holds" if r.passed else "FAILS", str(r.expectation.span.line),
                     r.expectation.text, r.outcome.message] for r in checked]
    hazards = tuple(getattr(program, "hazards", ()) or ())
    cautions = [CAUTIONS[h] for h in hazards if h in CAUTIONS]
    setting, notes = setting_lines(system), list(results.notes)
    colour = False
    if program.colour is not None or program.warnings:  # materials and colour (chromatic.py)
        from .chromatic import has_colour, setting_lines as material_lines

        colour = has_colour(program)
        if colour:
            setting += [line.strip() for line in material_lines(program)]
    return Sections(system.title or Path(program.file).name, program.file, units,
                    layout_rows(system), setting, first, notes,
                    expectations, _equations(program), cautions + ([GENERAL] if cautions else []),
                    requested_blocks(program, results, colour))


# --- Markdown --------------------------------------------------------------------------------

def _md_cell(text: str) -> str:
    return text.replace("|", "\\|")


def _md_table(head: list[str], rows: list[list[str]]) -> list[str]:
    lines = ["| " + " | ".join(head) + " |", "|" + "|".join(" --- " for _ in head) + "|"]
    lines += ["| " + " | ".join(_md_cell(c) for c in row) + " |" for row in rows]
    return lines


def _md_blocks(blocks: list[Block]) -> list[str]:
    out: list[str] = []
    for block in blocks:
        if isinstance(block, Heading):
            out += ["", f"### {_md_cell(block.text)}", ""]
        elif isinstance(block, Line):
            out += [_md_cell(block.text), ""]
        elif block.rows:
            head = block.head or ["" for _ in block.rows[0]]
            out += _md_table(head, block.body) + [""]
    return out


def markdown(s: Sections, drawing_link: str | None) -> str:
    """The report as Markdown; `drawing_link` is an image path or data URI (None: omitted)."""
    out = [f"# {s.title}", "", f"**{s.summary}**", "",
           f"File `{s.file}`, lengths in {s.units}. {SIGN_CONVENTION}.", ""]
    for caution in s.cautions:
        out += [f"> **{caution}**", ""]
    if drawing_link:
        out += ["## Drawing", "", f"![cross-section of {s.title}]({drawing_link})", ""]
    out += ["## Layout", ""] + _md_table(LAYOUT_HEADINGS, s.layout) + [""]
    out += ["## Setting", ""] + [f"- {line}" for line in s.setting] + [""]
    out += ["## First-order properties", ""] + _md_table(["quantity", "value"], s.first_order)
    out += [""] + [f"Note: {note}" for note in s.notes] + ([""] if s.notes else [])
    if s.requested:
        out += ["## Requested"] + _md_blocks(s.requested)
        while out[-1] == "":
            out.pop()
        out += [""]
    out += ["## Expectations", ""]
    if s.expectations:
        out += _md_table(["status", "line", "statement", "result"], s.expectations)
    else:
        out += ["The script states no expectations."]
    if s.equations:
        out += ["", "## Derived equations", ""]
        for name, _, tex in s.equations:
            out += [f"{name}:", "", f"$$ {tex} $$", ""]
    return "\n".join(out).rstrip() + "\n"


# --- HTML ------------------------------------------------------------------------------------

_CSS = ("body{font-family:system-ui,sans-serif;max-width:60em;margin:2em auto;color:#2b3440}"
        "table{border-collapse:collapse;margin:.5em 0}"
        "td,th{border-bottom:1px solid #d5dbe3;padding:.2em .8em;text-align:left}"
        ".holds{color:#1d6b3a}.FAILS{color:#a31f1f;font-weight:bold}"
        ".caution{border-left:4px solid #a31f1f;padding:.3em .8em}"
        ".summary{font-size:1.15em;padding:.3em .8em;border-left:4px solid currentColor}"
        "td{vertical-align:top}")


def _html_table(head: list[str], rows: list[list[str]], status_column: int | None = None) -> str:
    esc = html.escape
    parts = ["<table>"] + (["<tr>" + "".join(f"<th>{esc(h)}</th>" for h in head) + "</tr>"]
                           if head else [])
    for row in rows:
        cells = []
        for i, cell in enumerate(row):
            css = f' class="{cell}"' if i == status_column else ""
            cells.append(f"<td{css}>{esc(cell)}</td>")
        parts.append("<tr>" + "".join(cells) + "</tr>")
    parts.append("</table>")
    return "\n".join(parts)


def _html_blocks(blocks: list[Block]) -> list[str]:
    esc = html.escape
    out: list[str] = []
    for block in blocks:
        if isinstance(block, Heading):
            out.append(f"<h3>{esc(block.text)}</h3>")
        elif isinstance(block, Line):
            out.append(f"<p>{esc(block.text)}</p>")
        elif block.rows:
            out.append(_html_table(block.head or [], block.body))
    return out


def html_fragment(s: Sections, svg: str | None) -> str:
    """The report's body as HTML (also used for notebook display)."""
    esc = html.escape
    state = "holds" if s.all_hold else "FAILS"
    out = [f"<h1>{esc(s.title)}</h1>",
           f'<p class="summary {state}">{esc(s.summary)}</p>',
           f"<p>File <code>{esc(s.file)}</code>, lengths in {esc(s.units)}. "
           f"{esc(SIGN_CONVENTION)}.</p>"]
    out += [f'<p class="caution">{esc(c)}</p>' for c in s.cautions]
    if svg:
        out += ["<h2>Drawing</h2>", svg]
    out += ["<h2>Layout</h2>", _html_table(LAYOUT_HEADINGS, s.layout)]
    out += ["<h2>Setting</h2>", "<ul>" + "".join(f"<li>{esc(x)}</li>" for x in s.setting)
            + "</ul>"]
    out += ["<h2>First-order properties</h2>", _html_table(["quantity", "value"], s.first_order)]
    out += [f"<p>Note: {esc(n)}</p>" for n in s.notes]
    if s.requested:
        out += ["<h2>Requested</h2>"] + _html_blocks(s.requested)
    out += ["<h2>Expectations</h2>", _html_table(["status", "line", "statement", "result"],
                                                  s.expectations, 0) if s.expectations
            else "<p>The script states no expectations.</p>"]
    if s.equations:
        out += ["<h2>Derived equations</h2>"]
        out += [f"<p>{esc(name)}: \\[{esc(tex)}\\]</p>" if tex else
                f"<p>{esc(name)} = <code>{esc(text)}</code></p>" for name, text, tex in s.equations]
    return "\n".join(out)


def html_document(s: Sections, svg: str | None) -> str:
    """A whole self-contained HTML page (the drawing inline as SVG)."""
    return ("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
            f"<title>{html.escape(s.title)}</title>\n<style>{_CSS}</style>\n</head>\n<body>\n"
            + html_fragment(s, svg) + "\n</body>\n</html>\n")


# --- LaTeX -----------------------------------------------------------------------------------

_TEX_SPECIAL = {"\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
                "_": r"\_", "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}",
                "^": r"\textasciicircum{}", "±": r"$\pm$", "−": "-", "×": r"$\times$",
                "÷": r"$\div$", "µ": r"$\mu$", "<": r"$<$", ">": r"$>$", "ȳ": r"$\bar{y}$",
                "→": r"$\to$", "≤": r"$\le$", "≥": r"$\ge$", "≈": r"$\approx$",
                "°": r"$^\circ$", "·": r"$\cdot$", "²": r"$^2$", "λ": r"$\lambda$",
                "′": "'", "–": "--", "—": "---", "“": "``", "”": "''", "’": "'"}


#: A minus sign that starts a number (not the one in "real - paraxial" or in 1e-3).
_NEGATIVE = re.compile(r"(?<![\w.])-(?=\.?\d)(\S*)")


def tex_escape(text: str) -> str:
    """Text safe inside a LaTeX paragraph or table cell; a negative number is one unbreakable
    box with a true minus sign, so a line never breaks after its sign."""
    escaped = "".join(_TEX_SPECIAL.get(ch, ch if ord(ch) < 256 else f"[U+{ord(ch):04X}]")
                      for ch in text)  # plain pdflatex knows Latin-1; say which character it was
    return _NEGATIVE.sub(lambda m: r"\mbox{$-$" + m.group(1) + "}", escaped)


#: Cells that may wrap: ragged right, never hyphenated (the preamble forbids hyphenation).
def _wrapping(width: str) -> str:
    return r">{\raggedright\arraybackslash}p{" + width + "}"


def _tex_table(head: list[str] | None, rows: list[list[str]], spec: str) -> list[str]:
    lines = [r"\begin{longtable}{" + spec + "}", r"\hline"]
    if head:
        lines += [" & ".join(r"\textbf{" + tex_escape(h) + "}" for h in head) + r" \\",
                  r"\hline", r"\endhead"]
    lines += [" & ".join(tex_escape(c) for c in row) + r" \\" for row in rows]
    lines += [r"\hline", r"\end{longtable}"]
    return lines


def _tex_blocks(blocks: list[Block]) -> list[str]:
    out: list[str] = []
    for block in blocks:
        if isinstance(block, Heading):
            out.append(r"\subsubsection*{" + tex_escape(block.text) + "}")
        elif isinstance(block, Line):
            out.append(r"\noindent " + tex_escape(block.text) + r"\par")
        elif block.rows:
            columns = len(block.rows[0])
            table = _tex_table(block.head, block.body, "l" * columns)
            out += ([r"{\footnotesize"] + table + ["}"]) if columns > 4 else table
    return out


def latex_document(s: Sections, drawing_file: str | None) -> str:
    """A whole LaTeX document (article class; needs graphicx, longtable and amsmath)."""
    out = [r"\documentclass{article}", r"\usepackage[T1]{fontenc}", r"\usepackage[utf8]{inputenc}",
           r"\usepackage{graphicx,longtable,array,amsmath}", r"\usepackage[margin=2cm]{geometry}",
           r"\hyphenpenalty=10000 \exhyphenpenalty=10000  % words and signs are never split",
           r"\begin{document}", r"\section*{" + tex_escape(s.title) + "}",
           r"\noindent\textbf{" + tex_escape(s.summary) + r"}\par\medskip", "",
           tex_escape(f"File {s.file}, lengths in {s.units}. {SIGN_CONVENTION}."), ""]
    for caution in s.cautions:
        out += [r"\noindent\fbox{\parbox{\linewidth}{" + tex_escape(caution) + "}}", ""]
    if drawing_file:
        out += [r"\begin{figure}[h]", r"\centering",
                r"\includegraphics[width=\linewidth]{" + drawing_file + "}",
                r"\caption{Cross-section with the marginal and chief rays.}",
                r"\end{figure}", ""]
    out += [r"\subsection*{Layout}"] + _tex_table(LAYOUT_HEADINGS, s.layout, "rllllll")
    out += [r"\subsection*{Setting}", r"\begin{itemize}"]
    out += [r"\item " + tex_escape(line) for line in s.setting] + [r"\end{itemize}"]
    out += [r"\subsection*{First-order properties}"]
    out += _tex_table(["quantity", "value"], s.first_order, "ll")
    out += [tex_escape(f"Note: {n}") + r"\par" for n in s.notes]
    if s.requested:
        out += [r"\subsection*{Requested}"] + _tex_blocks(s.requested)
    out += [r"\subsection*{Expectations}"]
    if s.expectations:
        out += _tex_table(["status", "line", "statement", "result"], s.expectations,
                          "ll" + _wrapping(r"0.3\linewidth") + _wrapping(r"0.4\linewidth"))
    else:
        out += ["The script states no expectations."]
    if s.equations:
        out += [r"\subsection*{Derived equations}"]
        for name, text, tex in s.equations:
            out += [tex_escape(name) + ":", r"\begin{equation*}", tex or r"\text{"
                    + tex_escape(text) + "}", r"\end{equation*}"]
    out += [r"\end{document}"]
    return "\n".join(out) + "\n"


# --- one entry point -------------------------------------------------------------------------

@guarded
def render_document(path: str, doc_format: str, output: str | None = None) -> Document:
    """Build the report of one script.

    Args:
        path: the layout script.
        doc_format: md, html or latex.
        output: where the document will be written; the drawing file (SVG for Markdown, PDF
            for LaTeX) is written beside it. None: Markdown embeds the drawing as a data URI,
            LaTeX leaves it out (there is no file to include), HTML always embeds SVG.

    Returns:
        The document's text and whether every expectation holds.
    """
    from ..checks import evaluate_program
    from ..interpret.interpreter import load_file
    from .drawing import drawing_bytes

    program = load_file(path)
    results, checked = evaluate_program(program)  # numbers for every symbol, or a clear error
    sections = gather(program, results, checked)
    cautions = tuple(getattr(program, "hazards", ()) or ())

    def picture(kind: str) -> bytes | None:
        """The drawing, or None (with the reason among the notes) for a layout that cannot
        be drawn: the rest of the report is still worth having."""
        from ..errors import LayoutError

        try:
            return drawing_bytes(program.system, kind, cautions)
        except LayoutError as error:
            sections.notes.append(f"no drawing: {error.message}")
            return None

    if doc_format == "html":
        svg = picture("svg")
        inline = None if svg is None else svg.decode("utf-8")[svg.decode("utf-8").index("<svg"):]
        return Document(html_document(sections, inline), sections.all_hold)
    if doc_format == "md":
        svg = picture("svg")
        link = None
        if svg is not None and output is None:
            link = f"data:image/svg+xml;base64,{base64.b64encode(svg).decode()}"
        elif svg is not None:
            beside = Path(output).with_name(Path(output).stem + "-drawing.svg")
            beside.write_bytes(svg)
            link = beside.name
        return Document(markdown(sections, link), sections.all_hold)
    picture_name = None
    if output is not None:
        pdf = picture("pdf")
        if pdf is not None:
            beside = Path(output).with_name(Path(output).stem + "-drawing.pdf")
            beside.write_bytes(pdf)
            picture_name = beside.name
    return Document(latex_document(sections, picture_name), sections.all_hold)
