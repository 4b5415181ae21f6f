"""The workflow commands through the command line: check --junit and colour, format --check,
draw and report, with exit status 0/1/2 and errors as messages, never tracebacks."""

from __future__ import annotations

import io
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from layoutlang.cli import main
from layoutlang.reports.colour import paint, use_colour

# f = 50, s = 150 → s' = 75 (Hecht 2017, Optics, 5th ed., eq. 5.17; number from memory).
GOOD = """object 150 before, height 2
start in air
lens relay focal length 50
stop at relay, diameter 10
image at focus
expect image distance = 75 ± 0.01
"""
FAILING = GOOD.replace("= 75 ± 0.01", "= 70 ± 0.01")


def _write(tmp_path: Path, name: str, text: str) -> str:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_check_junit_and_exit_status(tmp_path: Path, capsys) -> None:
    good = _write(tmp_path, "good.lay", GOOD)
    bad = _write(tmp_path, "bad.lay", FAILING)
    broken = _write(tmp_path, "broken.lay", "surface radius into glass\n")
    junit = tmp_path / "out.xml"
    assert main(["check", good, "--junit", str(junit)]) == 0
    assert main(["check", good, bad, "--junit", str(junit)]) == 1
    root = ET.parse(junit).getroot()
    assert (root.get("tests"), root.get("failures")) == ("2", "1")
    assert main(["check", good, bad, broken, "--junit", str(junit)]) == 2
    root = ET.parse(junit).getroot()
    assert root.get("errors") == "1"
    out = capsys.readouterr()
    assert "\x1b[" not in out.out  # captured output is not a terminal: no colour
    assert "Traceback" not in out.err


def test_junit_file_that_cannot_be_written(tmp_path: Path, capsys) -> None:
    good = _write(tmp_path, "good.lay", GOOD)
    assert main(["check", good, "--junit", str(tmp_path / "missing" / "out.xml")]) == 2
    assert "cannot write" in capsys.readouterr().err


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_colour_only_on_a_terminal_and_never_with_no_color(monkeypatch) -> None:
    monkeypatch.delenv("NO_COLOR", raising=False)
    assert use_colour(_Terminal()) and not use_colour(io.StringIO())
    monkeypatch.setenv("NO_COLOR", "1")
    assert not use_colour(_Terminal())
    assert paint("FAIL", "bad", True) == "\x1b[31;1mFAIL\x1b[0m"
    assert paint("FAIL", "bad", False) == "FAIL"


def test_check_colours_a_terminal(tmp_path: Path, monkeypatch) -> None:
    bad = _write(tmp_path, "bad.lay", FAILING)
    terminal = _Terminal()
    monkeypatch.delenv("NO_COLOR", raising=False)
    monkeypatch.setattr("sys.stdout", terminal)
    assert main(["check", bad]) == 1
    assert "\x1b[31;1mFAIL\x1b[0m" in terminal.getvalue()


def test_format_check_diff_and_write(tmp_path: Path, capsys) -> None:
    messy = _write(tmp_path, "messy.lay", "gap  5\n")
    tidy = _write(tmp_path, "tidy.lay", "gap 5\n")
    assert main(["format", "--check", tidy]) == 0
    assert main(["format", "--check", tidy, messy]) == 1
    assert Path(messy).read_text() == "gap  5\n"  # --check writes nothing
    assert main(["format", "--diff", messy]) == 1
    assert "+gap 5" in capsys.readouterr().out
    assert main(["format", messy]) == 0
    assert Path(messy).read_text() == "gap 5\n"
    broken = _write(tmp_path, "broken.lay", "gap\n")
    assert main(["format", broken]) == 2
    assert "broken.lay:1" in capsys.readouterr().err


@pytest.mark.parametrize("suffix, magic", [("svg", b"<?xml"), ("png", b"\x89PNG"),
                                           ("pdf", b"%PDF")])
def test_draw_formats(tmp_path: Path, suffix: str, magic: bytes) -> None:
    pytest.importorskip("matplotlib")
    good = _write(tmp_path, "good.lay", GOOD)
    out = tmp_path / f"pic.{suffix}"
    assert main(["draw", good, "-o", str(out)]) == 0
    assert out.read_bytes().startswith(magic)


def test_draw_refuses_unknown_format_and_bad_script(tmp_path: Path, capsys) -> None:
    good = _write(tmp_path, "good.lay", GOOD)
    assert main(["draw", good, "-o", str(tmp_path / "pic.bmp")]) == 2
    assert "expected: a file name ending in .svg, .png, .pdf" in capsys.readouterr().err
    broken = _write(tmp_path, "broken.lay", "gap\n")
    assert main(["draw", broken, "-o", str(tmp_path / "pic.svg")]) == 2


def test_report_command(tmp_path: Path, capsys) -> None:
    pytest.importorskip("matplotlib")
    good = _write(tmp_path, "good.lay", GOOD)
    assert main(["report", good, "--format", "html"]) == 0
    assert capsys.readouterr().out.startswith("<!DOCTYPE html>")
    bad = _write(tmp_path, "bad.lay", FAILING)
    out = tmp_path / "r.tex"
    assert main(["report", bad, "--format", "latex", "-o", str(out)]) == 1
    assert out.read_text().startswith(r"\documentclass")


def test_draw_a_layout_that_cannot_be_drawn(tmp_path: Path, capsys) -> None:
    flat = _write(tmp_path, "flat.lay", "object 0 before, height 3\nstart in air\n"
                                        "surface s0 flat into air\nstop at s0, diameter 3\n")
    assert main(["draw", flat, "-o", str(tmp_path / "pic.svg")]) == 2
    err = capsys.readouterr().err
    assert "cannot be drawn" in err and "Traceback" not in err
    assert not (tmp_path / "pic.svg").exists()
