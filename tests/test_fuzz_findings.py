"""Every input that once broke layoutlang (tests/fixtures/fuzz/, one per failure class; INDEX.txt
names the command that broke) now ends in one clear error (exit 2, the file and a position) or
a finite result: never a traceback, never 'nan' or 'inf' printed, never a JSON crash."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from layoutlang.cli import main

FUZZ = Path(__file__).parent / "fixtures" / "fuzz"
NOT_FINITE = re.compile(r"\b(nan|inf)\b", re.IGNORECASE)

COMMANDS = {
    "run": lambda f, out: ["run", f],
    "json": lambda f, out: ["run", "--json", f],
    "derive": lambda f, out: ["derive", f],
    "report": lambda f, out: ["report", f],
    "reporthtml": lambda f, out: ["report", "--format", "html", f],
    "draw": lambda f, out: ["draw", f, "-o", str(out / "drawing.svg")],
    "format": lambda f, out: ["format", "--check", f],
    "meaning": lambda f, out: ["format", "--check", f],
}


def _index() -> list[tuple[str, str]]:
    found = []
    for line in (FUZZ / "INDEX.txt").read_text(encoding="utf-8").splitlines():
        if line.startswith("#") or ":" not in line:
            continue
        name, command = line.split(":", 1)
        found.append((name.strip(), command.strip().split(":")[0]))
    return found


def test_every_fixture_is_listed() -> None:
    listed = {name for name, _ in _index()}
    assert listed == {p.name for p in FUZZ.glob("*.lay")}


@pytest.mark.parametrize("name,command", _index(), ids=[n for n, _ in _index()])
def test_finding_ends_in_one_clear_error_or_a_finite_result(name, command, capsys,
                                                            tmp_path) -> None:
    file = str(FUZZ / name)
    status = main(COMMANDS[command](file, tmp_path))
    out, err = capsys.readouterr()
    assert "Traceback" not in err and "Traceback" not in out
    assert "internal error" not in err, err
    assert "set_int_max_str_digits" not in err + out
    assert not NOT_FINITE.search(out), out
    assert status in (0, 1, 2)
    if status == 2:
        # one error, at the file (and a line:column when one statement is to blame)
        assert err.count("error:") == 1, err
        assert re.search(re.escape(file) + r"(:\d+:\d+)?: error: ", err), err
    if command == "json" and status != 2:
        json.loads(out, parse_constant=_refuse)  # valid JSON without NaN or Infinity


def _refuse(constant: str):
    raise AssertionError(f"JSON holds {constant}")


def _clean_run(args: list[str], capsys) -> tuple[int, str, str]:
    status = main(args)
    out, err = capsys.readouterr()
    assert "Traceback" not in err
    return status, out, err


def test_line_letters_with_constant_index_media_draw_and_report(capsys, tmp_path) -> None:
    # the legend sorted labels by parsing their first word; '587.562, 486.1 nm' broke it
    for name in ("traceback_e856d13eb8.lay", "dp2.lay", "draw_primes.lay"):
        status, _, err = _clean_run(["draw", str(FUZZ / name), "-o", str(tmp_path / "d.svg")],
                                    capsys)
        assert status == 0, err
        assert (tmp_path / "d.svg").read_text().startswith("<?xml")
    status, out, _ = _clean_run(["report", str(FUZZ / "traceback_9d72a9c4d9.lay")], capsys)
    assert status in (0, 1) and "nm" in out


def test_flipped_radius_of_the_label_reader_says_what_cannot_be_computed(capsys) -> None:
    status, out, _ = _clean_run(["run", str(FUZZ / "label_flip.lay")], capsys)
    assert status == 1  # its expectations fail: the flipped radius changes the lens
    assert "cannot be computed" in out and not NOT_FINITE.search(out)
    status, out, _ = _clean_run(["run", "--json", str(FUZZ / "label_flip.lay")], capsys)
    data = json.loads(out)
    assert status == 1 and data["rays"]["exact_rays"]["marginal"][0]["real_focus"] is None


def test_symbolic_gap_with_many_digits_derives_the_same_with_and_without_flint(capsys,
                                                                              monkeypatch) -> None:
    pytest.importorskip("flint")
    from layoutlang.symbolic import convert

    outputs = []
    for backend in ("sympy", "flint"):
        monkeypatch.setattr(convert, "BACKEND", backend)
        status, out, err = _clean_run(["derive", str(FUZZ / "symgap_flint.lay")], capsys)
        assert status == 0, err
        outputs.append(out)
    assert outputs[0] == outputs[1]


def test_formatting_keeps_the_meaning_of_a_script_that_is_an_error(tmp_path) -> None:
    # format_meaning_*: an error before and after formatting, the same error (lines move)
    from layoutlang import format_script, loads
    from layoutlang.errors import LayoutError

    text = (FUZZ / "format_meaning_25a7ae8577.lay").read_text(encoding="utf-8")
    messages = []
    for version in (text, format_script(text)):
        with pytest.raises(LayoutError) as caught:
            loads(version, "x.lay")
        messages.append(re.sub(r"line [0-9]+", "line N", caught.value.message))
    assert messages[0] == messages[1]
