"""Tests of the session's workspace: edits, undo/redo, expectations changing state, save."""

from __future__ import annotations

from pathlib import Path

import pytest

from layoutlang.interpret.interpreter import load_file
from layoutlang.repl.workspace import LeaveRequested, Workspace, write_atomically

ROOT = Path(__file__).resolve().parent.parent

# An invented two-surface relay, for these tests only.
RELAY = """\
layout "Test relay"
units mm
let focal_goal = 90
medium crown index 1.517
medium flint index 1.620
object 250 before, height 4
start in air
surface front radius 52.9 into crown
gap 5.2
surface joint radius -38.1 into flint
gap 2.0
surface back radius -150.4 into air
stop at front, diameter 18
image at focus
expect focal length = focal_goal ± 0.5
expect f-number < 8
"""


@pytest.fixture
def relay(tmp_path: Path) -> Workspace:
    path = tmp_path / "relay.lay"
    path.write_text(RELAY, encoding="utf-8")
    return Workspace.open(path)


def focal(workspace: Workspace) -> float:
    return workspace.snapshot.results["focal length"]


def test_opening_a_script_is_not_an_unsaved_edit(relay: Workspace) -> None:
    assert relay.snapshot.complete and not relay.unsaved
    assert [r.passed for r in relay.snapshot.checked] == [True, True]


def test_an_edit_shows_old_and_new_values_with_units(relay: Workspace) -> None:
    out = relay.run("change front radius to 50")
    assert out.splitlines()[0] == "front is now radius 50"
    line = next(x for x in out.splitlines() if x.strip().startswith("focal length"))
    # the focal length printed before and after, both with their unit, and the difference
    assert "90.0243 mm" in line and "→" in line and "85.6951 mm" in line and "(-4.32926 mm)" in line
    assert relay.unsaved


def test_undo_and_redo_walk_the_whole_session(relay: Workspace) -> None:
    start = relay.snapshot.program.system
    relay.run("change front radius to 50")
    relay.run("change gap after front to 6")
    middle = relay.snapshot.program.system
    relay.run("rename front to entry")
    assert relay.run("undo").startswith("undone")
    assert relay.run("undo").startswith("undone")
    relay.run("undo")
    assert relay.snapshot.program.system == start
    assert relay.run("undo") == "nothing to be undone"
    relay.run("redo")
    relay.run("redo")
    assert relay.snapshot.program.system == middle
    relay.run("change crown index to 1.52")  # a new edit forgets what could be redone
    assert relay.run("redo") == "nothing to be redone"


def test_expectations_are_re_evaluated_and_their_change_of_state_shown(relay: Workspace) -> None:
    out = relay.run("change front radius to 40")
    assert "now     FAILS (was holds): expect focal length = focal_goal ± 0.5" in out
    out = relay.run("change focal_goal to 70")  # a constant the expectation uses
    assert "no shown quantity changed" in out
    assert "now     holds (was FAILS): expect focal length = focal_goal ± 0.5" in out
    out = relay.run("undo")
    assert "now     FAILS (was holds)" in out
    out = relay.run("expect image distance > 90")  # radius 40: the image is 93.6 mm away
    assert "new     holds: expect image distance > 90" in out
    out = relay.run("undo")
    assert "no longer checked: expect image distance > 90" in out


def test_an_error_keeps_every_earlier_edit(relay: Workspace) -> None:
    relay.run("change front radius to 50")
    before = relay.snapshot
    for bad in ("change front radius to 0",          # the interpreter refuses it
                "change nowhere radius to 5",        # no such surface
                "surface x radius",                   # a syntax error
                "change front radius to 5 deg",      # wrong unit
                "remove front"):                     # the stop stands at front
        out = relay.run(bad)
        assert "error:" in out, bad
        assert relay.snapshot is before
    assert "caret" not in out
    assert relay.run("undo").startswith("undone")  # the undo history is intact too


def test_insert_and_remove_keep_neighbours_in_place(relay: Workspace) -> None:
    length = relay.snapshot.results["axial length"]
    relay.run("insert surface window flat into crown after front")
    relay.run("insert gap 1 after front")
    assert "window" in relay.show("table")
    assert relay.snapshot.results["axial length"] == pytest.approx(length + 1)
    out = relay.run("remove window")
    assert "joined" in out
    script = relay.show("script")
    assert "gap 1 + 5.2" in script
    assert relay.snapshot.results["axial length"] == pytest.approx(length + 1)


def test_save_writes_a_canonical_script_that_loads_to_the_same_system(
        relay: Workspace, tmp_path: Path) -> None:
    relay.run("change front radius to 50")
    relay.run("insert surface window flat into crown after front")
    relay.run("rename joint to cemented")
    relay.run("expect image distance > 100")
    target = tmp_path / "saved.lay"
    assert relay.run(f'save "{target}"').startswith("saved 18 statements")
    assert not relay.unsaved
    assert load_file(target).system == relay.snapshot.program.system
    again = Workspace.open(target)
    assert again.statements == relay.statements
    # a bare save goes to the same file again
    relay.run("change back radius to -140")
    assert relay.run("save").endswith(str(target))
    assert load_file(target).system == relay.snapshot.program.system


def test_a_new_session_builds_a_layout_line_by_line(tmp_path: Path) -> None:
    workspace = Workspace()
    assert "not complete yet" in workspace.run("start in air")
    workspace.run("medium glass index 1.5")
    workspace.run("object 100 before")
    assert "complete" in workspace.run("surface front radius 25 into glass")
    assert "not complete yet" in workspace.run("gap 4")
    out = workspace.run("surface back radius -25 into air")
    assert "focal length" in out
    assert "error" in workspace.run("save")  # no file yet: says how to name one
    assert workspace.run(f'save "{tmp_path / "new.lay"}"').startswith("saved")


def test_show_and_questions_do_not_change_the_layout(relay: Workspace) -> None:
    before = relay.statements
    assert relay.show("table").splitlines()[1].split()[:2] == ["#", "boundary"]
    assert relay.show("script") == RELAY.rstrip("\n").replace("± 0.5", "± 0.5")
    answer = relay.run("report focal length, back focal distance")
    assert "focal length" in answer and "back focal distance" in answer
    assert relay.statements == before and not relay.unsaved


def test_leave_is_passed_to_the_session(relay: Workspace) -> None:
    with pytest.raises(LeaveRequested):
        relay.run("leave")


def test_session_commands_are_refused_in_script_files(tmp_path: Path) -> None:
    from layoutlang.errors import LayoutValueError

    path = tmp_path / "bad.lay"
    path.write_text("start in air\nsurface flat\nundo\n", encoding="utf-8")
    with pytest.raises(LayoutValueError, match="only in the interactive session"):
        load_file(path)


def test_atomic_write_never_leaves_a_half_file(tmp_path: Path, monkeypatch) -> None:
    import os

    target = tmp_path / "keep.lay"
    target.write_text("old\n", encoding="utf-8")

    def broken_replace(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", broken_replace)
    from layoutlang.errors import LayoutFileError

    with pytest.raises(LayoutFileError, match="cannot save"):
        write_atomically(target, "new\n")
    assert target.read_text(encoding="utf-8") == "old\n"
    assert [p.name for p in tmp_path.iterdir()] == ["keep.lay"]  # no temporary file left


def test_the_tour_example_opens_and_its_expectations_hold() -> None:
    workspace = Workspace.open(ROOT / "examples" / "conveyor_camera.lay")
    assert all(r.passed for r in workspace.snapshot.checked)


def test_save_keeps_every_comment_and_blank_line(tmp_path: Path) -> None:
    path = tmp_path / "commented.lay"
    original = "# what this shows\n\n" + RELAY.replace("gap 5.2\n", "gap 5.2  # why\n\n")
    path.write_text(original, encoding="utf-8")
    workspace = Workspace.open(path)
    workspace.run("change gap after front to 5.5")
    workspace.run("expect image distance > 10")
    assert workspace.run("save").startswith("saved")
    assert path.read_text(encoding="utf-8") == original.replace(
        "gap 5.2  # why", "gap 5.5  # why") + "expect image distance > 10\n"
    assert load_file(path).system == workspace.snapshot.program.system


def test_opening_an_example_changing_a_radius_and_saving_changes_exactly_that_number(
        tmp_path: Path) -> None:
    example = ROOT / "examples" / "label_reader_objective.lay"
    original = example.read_bytes()
    copy = tmp_path / example.name
    copy.write_bytes(original)
    workspace = Workspace.open(copy)
    boundary = next(s for s in workspace.statements
                    if getattr(s, "shape", None) is not None and s.shape.kind == "radius")
    old = boundary.shape.value.text
    workspace.run(f"change {boundary.name.text} radius to 33.25")
    workspace.run("save")
    written = copy.read_bytes()
    line = f"{boundary.kind} {boundary.name.text} radius {old}".encode()
    assert original.count(line) == 1
    assert written == original.replace(line, line.replace(old.encode(), b"33.25"))


def test_save_refuses_to_overwrite_a_file_changed_on_disk(relay: Workspace,
                                                         tmp_path: Path) -> None:
    relay.run("change front radius to 50")
    outside = RELAY.replace("units mm", "units mm  # edited in another window")
    relay.path.write_text(outside, encoding="utf-8")
    out = relay.run("save")
    assert "changed on disk since it was opened" in out and 'save "' in out
    assert relay.path.read_text(encoding="utf-8") == outside and relay.unsaved
    elsewhere = tmp_path / "mine.lay"
    assert relay.run(f'save "{elsewhere}"').startswith("saved")
    assert "radius 50 into crown" in elsewhere.read_text(encoding="utf-8")
    # saving again to the file just written is fine: it is as we left it
    relay.run("change front radius to 51")
    assert relay.run("save").startswith("saved")


def test_error_lines_are_the_lines_of_the_file_on_disk(tmp_path: Path) -> None:
    path = tmp_path / "spaced.lay"
    text = RELAY.replace("start in air\n", "start in air\n\n# the lens\n\n")
    path.write_text(text, encoding="utf-8")
    workspace = Workspace.open(path)
    out = workspace.run("change front radius to 0")
    line = text.splitlines().index("surface front radius 52.9 into crown") + 1
    assert f"{path}:{line}:" in out


def test_a_script_with_an_error_opens_and_can_be_fixed(tmp_path: Path) -> None:
    path = tmp_path / "broken.lay"
    path.write_text(RELAY.replace("into flint", "into flintt"), encoding="utf-8")
    workspace = Workspace.open(path)
    assert workspace.snapshot.error and "flintt" in workspace.notes[0]
    assert "error to fix first" in workspace.run("show results")
    out = workspace.run("change joint medium to flint")
    assert "no error now" in out and "focal length" in out
    assert workspace.snapshot.complete
    workspace.run("save")
    assert path.read_text(encoding="utf-8") == RELAY


def test_a_script_with_a_syntax_error_opens_without_that_line(tmp_path: Path) -> None:
    path = tmp_path / "typo.lay"
    path.write_text(RELAY.replace("expect f-number < 8", "expct f-number < 8"),
                    encoding="utf-8")
    workspace = Workspace.open(path)
    assert "expct" in workspace.notes[0] and "left out" in workspace.notes[0]
    assert workspace.snapshot.complete
    workspace.run("expect f-number < 8")
    workspace.run("save")
    # the retyped statement follows the one before it; the left-out line's blank stays
    assert path.read_text(encoding="utf-8") == RELAY + "\n"


def test_reports_of_other_features_are_answered_and_not_kept(relay: Workspace) -> None:
    before = relay.statements
    answer = relay.run("report seidel sums")
    assert "Seidel" in answer and "total" in answer
    assert relay.statements == before


def test_messages_name_the_file_and_the_line_it_will_have_when_saved(tmp_path: Path) -> None:
    path = tmp_path / "relay.lay"
    path.write_text("# a header comment kept on save\n" + RELAY, encoding="utf-8")
    workspace = Workspace.open(path)
    workspace.run("expect back focal distance > 1000")
    failing = [r for r in workspace.snapshot.checked if not r.passed]
    workspace.save()
    lines = path.read_text(encoding="utf-8").splitlines()
    (result,) = failing
    assert result.expectation.span.file == str(path)
    assert lines[result.expectation.span.line - 1].startswith("expect back focal distance")
    out = workspace.run("change front radius to 0")
    assert f"{path}:" in out and "error:" in out
