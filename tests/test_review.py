"""`layoutlang compare` and `check --against` on a git repository made by each test: what
changed in the statements (matched by name), in the shown quantities and in the expectations,
in text, Markdown and JSON, with exit status 0 / 1 (an expectation got worse) / 2 (error)."""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest

from layoutlang.cli import main
from layoutlang.review.engine import review
from layoutlang.review.revisions import Side

pytestmark = pytest.mark.skipif(shutil.which("git") is None, reason="needs the git command")

# an invented bench relay: a cemented pair imaging a target 250 mm away
RELAY = """\
# relay used by the review tests (invented)
layout "Bench relay"
units mm
medium crown index 1.517
medium flint index 1.62
object 250 before, height 4
start in air
surface front radius 52.9 into crown
gap 5.2
surface joint radius -38.1 into flint
gap 2
surface back radius -150.4 into air
stop at front, diameter 18
image at focus
expect focal length = 90 ± 0.5
expect f-number < 8
expect image distance > 100
"""


def git(repo: Path, *args: str) -> str:
    done = subprocess.run(["git", *args], cwd=repo, capture_output=True, text=True, check=True)
    return done.stdout


@pytest.fixture()
def repo(tmp_path: Path, monkeypatch) -> Path:
    """A repository whose first commit holds optics/relay.lay; the current folder is its top."""
    git(tmp_path, "init", "-q")
    git(tmp_path, "config", "user.email", "review@example.invalid")
    git(tmp_path, "config", "user.name", "review test")
    (tmp_path / "optics").mkdir()
    (tmp_path / "optics" / "relay.lay").write_text(RELAY, encoding="utf-8")
    git(tmp_path, "add", ".")
    git(tmp_path, "commit", "-q", "-m", "first")
    monkeypatch.chdir(tmp_path)
    return tmp_path


def edit(repo: Path, text: str, commit: bool = True) -> None:
    (repo / "optics" / "relay.lay").write_text(text, encoding="utf-8")
    if commit:
        git(repo, "commit", "-q", "-am", "edit")


def compare(capsys, *argv: str) -> tuple[int, str, str]:
    status = main(["compare", *argv])
    out, err = capsys.readouterr()
    return status, out, err


def compare_json(capsys, before: str = "HEAD~1:optics/relay.lay",
                 after: str = "optics/relay.lay", *more: str) -> tuple[int, dict]:
    status, out, _ = compare(capsys, "--json", before, after, *more)
    return status, json.loads(out)


def changes(data: dict, kind: str) -> list[dict]:
    return [c for c in data["statements"] if c["change"] == kind]


def quantity(data: dict, label: str) -> dict:
    return next(q for q in data["quantities"] if q["quantity"] == label)


def test_radius_change_is_one_changed_statement_and_moves_the_focus(repo, capsys) -> None:
    edit(repo, RELAY.replace("radius 52.9", "radius 55"))
    status, data = compare_json(capsys)
    assert [c["what"] for c in data["statements"]] == ["surface front"]
    change = data["statements"][0]
    assert change["change"] == "changed" and change["before_line"] == change["after_line"] == 8
    assert "radius 52.9" in change["before"] and "radius 55" in change["after"]
    focal = quantity(data, "focal length")
    before, after = focal["before"]["value"], focal["after"]["value"]
    assert after > before  # a flatter front surface: weaker, longer focal length
    assert focal["difference"] == pytest.approx(after - before)
    assert focal["after"]["unit"] == "mm"
    assert data["worse"] is (status == 1)
    status, out, _ = compare(capsys, "HEAD~1:optics/relay.lay", "optics/relay.lay")
    line = next(line for line in out.splitlines() if line.strip().startswith("focal length"))
    assert "→" in line and f"(+" in line and "mm" in line


def test_inserted_surface_is_an_insertion_not_a_change_of_what_follows(repo, capsys) -> None:
    edit(repo, RELAY.replace("gap 2\n", "gap 1\nsurface window flat into air\ngap 1\n"))
    _, data = compare_json(capsys)
    inserted = changes(data, "inserted")
    assert [c["what"] for c in inserted] == ["surface window", "gap after surface window"]
    assert inserted[0]["where"] == "after surface joint" and "where" not in inserted[1]
    assert [c["what"] for c in changes(data, "changed")] == ["gap after surface joint"]
    assert not changes(data, "removed")  # surface back, the stop… are the same statements


def test_renamed_surface_is_a_rename_and_its_references_follow(repo, capsys) -> None:
    edit(repo, RELAY.replace("surface front", "surface entry").replace("stop at front",
                                                                      "stop at entry"))
    status, data = compare_json(capsys)
    assert [(c["change"], c["what"], c.get("where")) for c in data["statements"]] == [
        ("renamed", "surface entry", "front")]  # the stop names it too: not a change
    assert data["quantities"] == [] and data["expectations"] == [] and status == 0
    # renamed and changed at once: still one rename, the new text shown
    edit(repo, RELAY.replace("surface joint radius -38.1", "surface cement radius -40"))
    _, data = compare_json(capsys, "HEAD~2:optics/relay.lay")
    assert [(c["change"], c["what"]) for c in data["statements"]] == [("renamed",
                                                                      "surface cement")]
    assert "radius -40" in data["statements"][0]["after"]


def test_medium_change_and_a_surface_into_another_medium(repo, capsys) -> None:
    edit(repo, RELAY.replace("medium flint index 1.62", "medium flint index 1.65"))
    _, data = compare_json(capsys)
    assert [(c["change"], c["what"]) for c in data["statements"]] == [("changed",
                                                                      "medium flint")]
    assert quantity(data, "focal length")["difference"] != 0
    edit(repo, RELAY.replace("radius -38.1 into flint", "radius -38.1 into crown"), False)
    _, data = compare_json(capsys, "HEAD~1:optics/relay.lay")
    assert [(c["change"], c["what"]) for c in data["statements"]] == [("changed",
                                                                      "surface joint")]


def test_renamed_medium_is_a_rename(repo, capsys) -> None:
    edit(repo, RELAY.replace("crown", "bk"))
    _, data = compare_json(capsys)
    assert [(c["change"], c["what"], c.get("where")) for c in data["statements"]] == [
        ("renamed", "medium bk", "crown")]


def test_removed_expectation_is_no_longer_checked_and_not_worse(repo, capsys) -> None:
    edit(repo, RELAY.replace("expect image distance > 100\n", ""))
    status, data = compare_json(capsys)
    assert status == 0 and data["worse"] is False
    assert [(c["change"], c["what"]) for c in data["statements"]] == [
        ("removed", "expectation on image distance")]
    gone = data["expectations"]
    assert len(gone) == 1 and gone[0]["change"] == "gone"
    assert gone[0]["before"]["statement"] == "expect image distance > 100"
    assert gone[0]["after"] is None
    status, out, _ = compare(capsys, "--markdown", "HEAD~1:optics/relay.lay",
                             "optics/relay.lay")
    assert "no longer checked" in out


def test_an_expectation_that_now_fails_exits_1_in_every_format(repo, capsys) -> None:
    edit(repo, RELAY.replace("radius 52.9", "radius 40"))
    for shape in ((), ("--markdown",), ("--json",)):
        status, out, _ = compare(capsys, *shape, "HEAD~1:optics/relay.lay", "optics/relay.lay")
        assert status == 1
    assert "got worse" in out
    data = json.loads(out)
    assert data["worse"] and any(c["worse"] and c["change"] == "now"
                                 for c in data["expectations"])
    # the other way round it got better: exit 0, and said so
    status, data = compare_json(capsys, "optics/relay.lay", "HEAD~1:optics/relay.lay")
    assert status == 0 and "now hold" in data["summary"]


def test_markdown_opens_with_a_summary_line_then_tables(repo, capsys) -> None:
    edit(repo, RELAY.replace("radius 52.9", "radius 40"))
    status, out, _ = compare(capsys, "--markdown", "HEAD~1:optics/relay.lay",
                             "optics/relay.lay")
    lines = out.splitlines()
    assert lines[0].startswith("**optics/relay.lay** against HEAD~1:optics/relay.lay: "
                               "**expectation got worse**.")
    assert "#### Prescription" in lines and "#### Optics" in lines and \
        "#### Expectations" in lines
    assert "| changed | surface front | `surface front radius 52.9 into crown` | " \
           "`surface front radius 40 into crown` |" in lines


def test_all_lists_unchanged_quantities_too(repo, capsys) -> None:
    edit(repo, RELAY.replace("medium flint index 1.62", "medium flint index 1.65"))
    _, changed_only = compare_json(capsys)
    _, every = compare_json(capsys, "HEAD~1:optics/relay.lay", "optics/relay.lay", "--all")
    assert all(q["changed"] for q in changed_only["quantities"])
    unchanged = [q["quantity"] for q in every["quantities"] if not q["changed"]]
    assert "stop diameter" in unchanged and "entrance pupil diameter" in unchanged
    assert len(every["quantities"]) > len(changed_only["quantities"])


def test_symbolic_script_compares_at_its_nominal_values(repo, capsys) -> None:
    source = Path(__file__).parents[1] / "examples" / "symbolic_one_boundary.lay"
    text = source.read_text(encoding="utf-8")
    (repo / "face.lay").write_text(text, encoding="utf-8")
    git(repo, "add", "face.lay")
    git(repo, "commit", "-q", "-m", "face")
    (repo / "face.lay").write_text(text.replace("R = 5,", "R = 5.5,"), encoding="utf-8")
    status, data = compare_json(capsys, "HEAD:face.lay", "face.lay")
    assert [(c["change"], c["what"]) for c in data["statements"]] == [("changed",
                                                                      "nominal values")]
    image = quantity(data, "image distance")
    assert image["before"]["value"] == pytest.approx(101.59, abs=0.01)
    assert image["difference"] != 0
    assert status == 1  # the expectations were written for R = 5


def test_a_script_error_in_one_revision_is_said_and_exits_2(repo, capsys) -> None:
    edit(repo, RELAY.replace("gap 5.2", "gap 5.2 mm mm"))
    for shape in ((), ("--markdown",)):
        status, out, err = compare(capsys, *shape, "HEAD~1:optics/relay.lay",
                                   "HEAD:optics/relay.lay")
        assert status == 2 and out == ""
        assert "the after version (HEAD:optics/relay.lay) cannot be compared" in err
        assert "HEAD:optics/relay.lay:9:" in err and "^" in err
    status, data = compare_json(capsys, "HEAD~1:optics/relay.lay", "HEAD:optics/relay.lay")
    assert status == 2 and "cannot be compared" in data["error"]


def test_a_missing_revision_or_file_or_git_is_a_clear_error(repo, capsys, monkeypatch) -> None:
    status, _, err = compare(capsys, "nosuchbranch:optics/relay.lay", "optics/relay.lay")
    assert status == 2 and "cannot read nosuchbranch:optics/relay.lay from git" in err
    assert "expected: an existing revision" in err and "Traceback" not in err
    status, _, err = compare(capsys, "HEAD:optics/other.lay", "optics/relay.lay")
    assert status == 2 and "cannot read HEAD:optics/other.lay from git" in err
    status, _, err = compare(capsys, "missing.lay", "optics/relay.lay")
    assert status == 2 and "cannot read missing.lay" in err
    monkeypatch.setattr(shutil, "which", lambda name: None)
    status, _, err = compare(capsys, "HEAD:optics/relay.lay", "optics/relay.lay")
    assert status == 2 and "the git command is not installed" in err


def test_a_file_compared_with_itself_reports_nothing(repo, capsys) -> None:
    for before in ("optics/relay.lay", "HEAD:optics/relay.lay"):
        status, data = compare_json(capsys, before, "optics/relay.lay")
        assert status == 0
        assert data["statements"] == data["quantities"] == data["expectations"] == []
        assert data["summary"] == "no change in the prescription or in what it computes"
    # reformatting and comments change no statement
    edit(repo, "# a new comment\n" + RELAY.replace("gap 5.2", "gap   5.2   # thicker?"), False)
    _, data = compare_json(capsys, "HEAD:optics/relay.lay")
    assert data["statements"] == [] and data["quantities"] == []


def test_check_against_adds_the_summary_and_writes_markdown(repo, capsys) -> None:
    edit(repo, RELAY.replace("radius 52.9", "radius 40"), commit=False)
    status = main(["check", "--against", "HEAD", "--markdown", "review.md",
                   "optics/relay.lay"])
    out, _ = capsys.readouterr()
    assert status == 1
    assert "  against HEAD: 1 statement changed;" in out and "got worse" in out
    text = (repo / "review.md").read_text(encoding="utf-8")
    assert text.startswith("**Layout review against HEAD**: an expectation got worse in "
                           "optics/relay.lay")
    assert "### optics/relay.lay" in text and "#### Prescription" in text
    (repo / "optics" / "new.lay").write_text(RELAY, encoding="utf-8")
    status = main(["check", "--json", "--against", "HEAD", "optics/new.lay"])
    document = json.loads(capsys.readouterr()[0])[0]
    assert status == 0 and "not compared with HEAD" in document["against"]["summary"]
    assert main(["check", "--markdown", "x.md", "optics/new.lay"]) == 2
    assert "--against" in capsys.readouterr()[1]


def test_session_and_compare_share_one_engine(repo) -> None:
    """The session's before → after lines come from the same review as compare's."""
    from layoutlang.repl.changes import describe_changes
    from layoutlang.review.render import session_lines

    before = Side("a", RELAY, repo).snapshot()
    after = Side("b", RELAY.replace("radius 52.9", "radius 55"), repo).snapshot()
    assert describe_changes(before, after) == session_lines(
        review(before, after, statements=False), after.readings)


def test_a_report_section_added_later_is_compared_with_no_change_in_review(repo, monkeypatch
                                                                          ) -> None:
    """Readings follow the machine-readable report: a new section shows up by itself."""
    from layoutlang.reports import machine

    plain = machine.program_json

    def with_new_section(program, results, checked):
        document = plain(program, results, checked)
        focal = results["focal length"]
        document["beam"] = {"waist": {"value": focal / 100, "unit": "mm"},
                            "rows": [{"field": 0.5, "coupling_percent": 90 + focal / 100}]}
        return document

    monkeypatch.setattr(machine, "program_json", with_new_section)
    before = Side("a", RELAY, repo).snapshot()
    after = Side("b", RELAY.replace("radius 52.9", "radius 55"), repo).snapshot()
    found = {c.label: c for c in review(before, after).quantities}
    assert found["beam waist"].unit == "mm" and found["beam waist"].difference > 0
    assert found["beam rows field 0.5 coupling"].unit == "%"


def test_what_the_script_sets_is_said_once_as_a_statement_not_again_as_a_quantity(repo, capsys
                                                                                ) -> None:
    edit(repo, RELAY.replace("object 250 before", "object 300 before"))
    _, data = compare_json(capsys)
    assert [(c["change"], c["what"]) for c in data["statements"]] == [("changed", "object")]
    parts = {q["part"] for q in data["quantities"]}
    assert parts <= {"first order", "expected"} and "image distance" in {
        q["quantity"] for q in data["quantities"]}


def test_output_goes_to_a_file_and_an_unwritable_one_is_an_error(repo, capsys) -> None:
    edit(repo, RELAY.replace("radius 52.9", "radius 55"))
    status, out, err = compare(capsys, "--markdown", "-o", "review.md",
                               "HEAD~1:optics/relay.lay", "optics/relay.lay")
    assert out == "" and "review.md: written" in err
    assert (repo / "review.md").read_text(encoding="utf-8").startswith("**optics/relay.lay**")
    status, _, err = compare(capsys, "-o", "no/such/folder/review.md",
                             "HEAD~1:optics/relay.lay", "optics/relay.lay")
    assert status == 2 and "cannot write no/such/folder/review.md" in err


def test_the_session_shows_colour_and_ray_changes_too(tmp_path) -> None:
    """One engine: what compare lists beyond first order, the session lists after an edit."""
    from layoutlang.repl.workspace import Workspace

    source = Path(__file__).parents[1] / "examples" / "cemented_achromat.lay"
    script = tmp_path / "scope.lay"
    script.write_text(source.read_text(encoding="utf-8"), encoding="utf-8")
    out = Workspace.open(script).run("change front radius to 66")
    assert "axial colour between F and C" in out and "→" in out
    assert "now     FAILS (was holds): expect axial colour between F and C" in out


def test_a_symbolic_scripts_closed_forms_and_sensitivities_are_compared(repo, capsys) -> None:
    source = Path(__file__).parents[1] / "examples" / "symbolic_thick_lens.lay"
    text = source.read_text(encoding="utf-8")
    (repo / "thick.lay").write_text(text, encoding="utf-8")
    git(repo, "add", "thick.lay")
    git(repo, "commit", "-q", "-m", "thick")
    # a nominal value changes numbers, not the closed forms
    (repo / "thick.lay").write_text(text.replace("R2 = -60", "R2 = -50"), encoding="utf-8")
    _, data = compare_json(capsys, "HEAD:thick.lay", "thick.lay")
    parts = {q["part"] for q in data["quantities"]}
    assert "closed forms" not in parts and "sensitivities" in parts
    # the layout's structure changes the closed forms
    (repo / "thick.lay").write_text(text.replace("radius R2 into air", "radius 2*R2 into air"),
                                    encoding="utf-8")
    _, data = compare_json(capsys, "HEAD:thick.lay", "thick.lay")
    lensmaker = quantity(data, "lensmaker equation")
    assert lensmaker["part"] == "closed forms" and "2*R2" in lensmaker["after"]["text"]
    assert "2*R2" not in lensmaker["before"]["text"]


EXAMPLES = sorted((Path(__file__).parents[1] / "examples").glob("*.lay"))


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_every_example_against_itself_and_against_another(path, capsys) -> None:
    """Nothing to report against itself; against an unrelated layout, a full review in every
    format with no error."""
    status, out, _ = compare(capsys, "--json", str(path), str(path))
    data = json.loads(out)
    assert status == 0 and data["statements"] == data["quantities"] == data["expectations"] == []
    other = EXAMPLES[(EXAMPLES.index(path) + 1) % len(EXAMPLES)]
    for shape in ((), ("--markdown",), ("--json",)):
        status, out, err = compare(capsys, *shape, str(other), str(path))
        assert status in (0, 1) and out and "error" not in err


TOLERANCED = """\
# the relay with its tolerances, kept in a second file (invented)
use "relay.lay"
tolerance radius of front ± 0.4%, normal 3 sigma
tolerance gap after front ± 0.05
monte carlo 400 samples, seed 7
expect yield > 90%
report tolerances
"""


def test_a_script_using_another_file_is_compared_with_its_tolerances(repo, capsys) -> None:
    """A script whose surfaces come from a used file is complete, and a tolerance change is
    said as a statement in its own words, with the tolerance analysis that moved."""
    (repo / "optics" / "toleranced.lay").write_text(TOLERANCED, encoding="utf-8")
    git(repo, "add", ".")
    git(repo, "commit", "-q", "-m", "tolerances")
    (repo / "optics" / "toleranced.lay").write_text(
        TOLERANCED.replace("± 0.4%", "± 1.5%"), encoding="utf-8")
    status, data = compare_json(capsys, "HEAD:optics/toleranced.lay", "optics/toleranced.lay")
    assert status in (0, 1)
    assert data["before_incomplete"] is None and data["after_incomplete"] is None
    (changed,) = changes(data, "changed")
    assert changed["what"] == "tolerance radius of front"
    labels = {q["quantity"] for q in data["quantities"]}
    assert any("sensitivity on radius of front" in label for label in labels)
    assert "tolerances monte carlo yield" in labels


def test_a_script_using_a_file_of_media_only_is_still_being_built(repo, capsys) -> None:
    """No surface in the script nor in the file it uses: not complete, said in words."""
    (repo / "optics" / "media.lay").write_text("units mm\nmedium crown index 1.5\n",
                                              encoding="utf-8")
    (repo / "optics" / "start.lay").write_text('use "media.lay"\nstart in air\n',
                                              encoding="utf-8")
    status, data = compare_json(capsys, "optics/start.lay", "optics/start.lay")
    assert status == 0
    assert "no surface" in data["before_incomplete"]
