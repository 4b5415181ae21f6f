"""Headless tests of the interactive session: pipe input, dummy output, the whole loop."""

from __future__ import annotations

import re
from pathlib import Path

from prompt_toolkit.application import create_app_session
from prompt_toolkit.input import create_pipe_input
from prompt_toolkit.output import DummyOutput

from layoutlang.cli import main
from layoutlang.formatter import format_text
from layoutlang.interpret.interpreter import load_file
from layoutlang.repl.session import Session
from layoutlang.repl.workspace import Workspace

ROOT = Path(__file__).resolve().parent.parent
CAMERA = ROOT / "examples" / "barcode_reader.lay"


def run_session(keys: str, workspace: Workspace | None = None, **parts) -> tuple[str, int]:
    """Type `keys` into a session; returns what it printed and its exit status."""
    printed: list[str] = []
    with create_pipe_input() as pipe:
        with create_app_session(input=pipe, output=DummyOutput()):
            pipe.send_text(keys)
            session = Session(workspace, input=pipe, output=DummyOutput(),
                              write=printed.append, **parts)
            status = session.run()
    return "".join(printed), status


def test_the_five_minute_tour(tmp_path: Path) -> None:
    """Open an example, change a radius, see the focus move, undo, add an expectation, save,
    and the saved script passes `layoutlang check`."""
    copy = tmp_path / "barcode_reader.lay"
    copy.write_text(CAMERA.read_text(encoding="utf-8"), encoding="utf-8")
    workspace = Workspace.open(copy)
    original = workspace.snapshot.program.system
    out, status = run_session(
        "change front radius to 22\r"
        "undo\r"
        "expect back focal distance > 20\r"
        "save\r"
        "\x04",  # Ctrl-D: nothing unsaved, so it leaves without asking
        workspace)
    assert status == 0
    assert "front is now radius 22" in out
    assert "image distance" in out and "→" in out  # the focus moved, old and new shown
    assert "undone" in out
    assert "new     holds: expect back focal distance > 20" in out
    assert f"saved {len(workspace.statements)} statements to {copy}" in out
    assert load_file(copy).system == original
    assert main(["check", str(copy)]) == 0
    # saving writes the file back byte for byte, with the new expectation appended (it is not
    # aligned with the block above: that would re-space lines the session did not change)
    assert copy.read_text(encoding="utf-8") == (
        CAMERA.read_text(encoding="utf-8") + "expect back focal distance > 20\n")


def test_unfinished_statements_continue_on_the_next_line() -> None:
    workspace = Workspace()
    out, _ = run_session(
        "start in air\r"
        "surface front radius\r"      # not finished: continues
        "25 into air\r"
        "wavelengths 587.6 nm primary,\r"
        "486.1 nm\r"
        "show script\r"
        "\x04yes\r", workspace, validator=None)
    assert "surface front radius 25 into air\nwavelengths 587.6 nm primary, 486.1 nm" in out


def test_an_empty_line_ends_an_unfinished_statement_with_its_error() -> None:
    out, _ = run_session("start in air\rsurface front radius\r\rshow script\r\x04yes\r",
                         Workspace(), validator=None)
    assert "error:" in out and "radius" in out
    assert out.rstrip().endswith("start in air")


def test_errors_are_printed_and_the_loop_goes_on() -> None:
    workspace = Workspace.open(CAMERA)
    before = workspace.snapshot
    out, status = run_session("change front radius to 0\rchange nowhere radius to 3\r"
                              "surface ) flat\r\x04", workspace, validator=None)
    assert out.count("error:") == 3 and "Traceback" not in out
    assert workspace.snapshot is before and status == 0


def test_ctrl_c_clears_the_line_and_an_unfinished_statement() -> None:
    workspace = Workspace.open(CAMERA)
    out, _ = run_session("change front radius to 99\x03"     # typed, then cleared
                         "surface extra radius\r\x03"        # unfinished, then dropped
                         "show script\r\x04", workspace, validator=None)
    assert "99" not in out and "extra" not in out
    assert not workspace.unsaved


def test_ctrl_d_asks_before_leaving_with_unsaved_edits(tmp_path: Path) -> None:
    workspace = Workspace.open(CAMERA)
    out, status = run_session("change front radius to 22\r\x04no\rshow table\r\x04yes\r",
                              workspace)
    assert status == 0
    assert re.search(r"front +radius 22 mm", out)  # still there after saying no
    assert workspace.unsaved


def test_leave_word_also_asks() -> None:
    workspace = Workspace.open(CAMERA)
    out, status = run_session("change front radius to 22\rleave\ryes\r", workspace)
    assert status == 0


def test_after_a_rejected_line_the_prompt_starts_clean_and_the_line_is_in_history() -> None:
    from prompt_toolkit.history import InMemoryHistory

    history = InMemoryHistory()
    workspace = Workspace.open(CAMERA)
    # default parts: a wrong line is run and refused, never held in the prompt
    out, status = run_session("surface ) flat\rchange front radius to 27\r\x04yes\r",
                              workspace, history=history)
    assert status == 0
    assert "error:" in out and "^" in out
    assert "front is now radius 27" in out  # the next line was read on its own, clean
    assert list(history.load_history_strings())[-2:] == ["change front radius to 27",
                                                        "surface ) flat"]


def test_typed_lines_go_to_the_history() -> None:
    from prompt_toolkit.history import InMemoryHistory

    history = InMemoryHistory()
    run_session("show table\rundo\r\x04", Workspace.open(CAMERA), history=history)
    assert list(history.load_history_strings()) == ["undo", "show table"]


def test_the_command_line_opens_a_script_with_errors_to_fix_it(tmp_path: Path, capsys,
                                                              monkeypatch) -> None:
    bad = tmp_path / "bad.lay"
    bad.write_text("start in air\nsurface front radius into air\n", encoding="utf-8")
    with create_pipe_input() as pipe:
        pipe.send_text("surface front radius 20 into air\rshow script\r\x04yes\r")
        with create_app_session(input=pipe, output=DummyOutput()):
            assert main(["repl", str(bad), "--no-history"]) == 0
    out = capsys.readouterr().out
    assert "bad.lay:2:" in out and "left out" in out
    assert "start in air\nsurface front radius 20 into air" in out


def test_the_command_line_refuses_a_file_it_cannot_read(tmp_path: Path, capsys) -> None:
    folder = tmp_path / "folder.lay"
    folder.mkdir()
    assert main(["repl", str(folder), "--no-history"]) == 2
    assert "cannot read" in capsys.readouterr().err
