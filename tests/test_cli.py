"""Tests of the command line: `layoutlang run` and `layoutlang check`, exit codes 0/1/2, the
one-line summaries, failure messages and deterministic JSON."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from layoutlang.cli import main

PASSING = """\
# a 50 mm singlet at 1:1 (invented)
layout "Bench singlet"
start in air
lens l focal length 50
object 100 before, height 2
stop at l, diameter 10
expect focal length = 50 ± 0.01
expect magnification = -1 within 0.1%
expect f-number < 11
"""

FAILING = PASSING.replace("expect f-number < 11", "expect image distance = 90 mm ± 0.5 mm")

SYNTAX = "start in air\nsurfce l radius 5\n"

SEMANTIC = "start in air\nlens l focal length 50\ngap -3\nlens m focal length 5\n"

AT_INFINITY = "start in air\nlens l focal length 50\nobject 50 before, height 1\n" \
              "stop at l, diameter 10\nexpect image distance > 0\n"


@pytest.fixture()
def scripts(tmp_path: Path) -> dict[str, str]:
    paths = {}
    for name, text in [("passing", PASSING), ("failing", FAILING), ("syntax", SYNTAX),
                       ("semantic", SEMANTIC), ("infinity", AT_INFINITY)]:
        path = tmp_path / f"{name}.lay"
        path.write_text(text, encoding="utf-8")
        paths[name] = str(path)
    return paths


def run(capsys, *argv: str) -> tuple[int, str, str]:
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


# --- check ------------------------------------------------------------------------------------


def test_check_all_hold(capsys, scripts) -> None:
    status, out, err = run(capsys, "check", scripts["passing"])
    assert status == 0
    assert out == f"{scripts['passing']}: all 3 expectations hold\n"
    assert err == ""


def test_check_failure_shows_location_expected_actual_tolerance_and_unit(capsys, scripts) -> None:
    status, out, _ = run(capsys, "check", scripts["failing"])
    assert status == 1
    lines = out.splitlines()
    assert lines[0] == f"{scripts['failing']}: 1 of 3 expectations FAIL"
    # file:line:column, the actual value, the expected value and tolerance, all with units
    assert lines[1].startswith(f"  {scripts['failing']}:9:1: image distance = 100 mm")
    assert "expected 90 mm ± 0.5 mm" in lines[1] and "off by 10 mm" in lines[1]


def test_check_several_files_one_summary_line_each(capsys, scripts) -> None:
    status, out, err = run(capsys, "check", scripts["passing"], scripts["failing"],
                           scripts["syntax"])
    assert status == 2  # a script error outranks a failed expectation
    summaries = [line for line in out.splitlines() if not line.startswith("  ")]
    assert summaries == [f"{scripts['passing']}: all 3 expectations hold",
                         f"{scripts['failing']}: 1 of 3 expectations FAIL",
                         f"{scripts['syntax']}: error, not checked"]
    assert f"{scripts['syntax']}:2:1: error: unexpected word 'surfce'" in err
    assert "did you mean 'surface'?" in err


@pytest.mark.parametrize("name, where", [("syntax", ":2:1:"), ("semantic", ":3:5:")])
def test_script_errors_exit_2_with_location_and_caret(capsys, scripts, name, where) -> None:
    status, out, err = run(capsys, "check", scripts[name])
    assert status == 2
    assert scripts[name] + where in err and "^" in err
    assert "Traceback" not in err


def test_missing_file_exits_2(capsys, tmp_path) -> None:
    status, out, err = run(capsys, "check", str(tmp_path / "absent.lay"))
    assert status == 2 and "cannot read" in err


def test_usage_error_exits_2(capsys) -> None:
    with pytest.raises(SystemExit) as info:
        main(["check"])
    assert info.value.code == 2
    with pytest.raises(SystemExit) as info:
        main(["frobnicate"])
    assert info.value.code == 2


def test_unavailable_quantity_fails_with_its_reason(capsys, scripts) -> None:
    status, out, _ = run(capsys, "check", scripts["infinity"])
    assert status == 1
    assert "image distance is at infinity: the object is at the front focal point" in out


# --- run --------------------------------------------------------------------------------------


def test_run_prints_table_report_and_expectations(capsys, scripts) -> None:
    status, out, _ = run(capsys, "run", scripts["passing"])
    assert status == 0
    assert out.startswith("layout: Bench singlet\n")
    assert "signs: light starts travelling in +z" in out
    for heading in ("boundaries", "setting", "first-order properties", "expectations"):
        assert f"\n{heading}\n" in out
    assert "focal length" in out and "50 mm" in out
    assert "image distance              100 mm  (real image, downstream)" in out
    assert "magnification               -1  (inverted)" in out
    assert "holds  line 7" in out


def test_run_exit_1_on_a_failed_expectation(capsys, scripts) -> None:
    status, out, _ = run(capsys, "run", scripts["failing"])
    assert status == 1 and "FAILS  line 9" in out


def test_run_words_for_virtual_images_and_infinity(capsys, tmp_path) -> None:
    path = tmp_path / "magnifier.lay"
    path.write_text("start in air\nlens l focal length 50\nobject 25 before, height 1\n")
    status, out, _ = run(capsys, "run", str(path))
    assert status == 0
    assert "-50 mm  (virtual image, 50 mm upstream of the last boundary)" in out
    assert "(upright)" in out
    status, out, _ = run(capsys, "run", str(tmp_path / "absent.lay"))
    assert status == 2


def test_run_of_a_script_with_an_image_at_infinity(capsys, scripts) -> None:
    status, out, _ = run(capsys, "run", scripts["infinity"])
    assert "at infinity: the object is at the front focal point" in out
    assert "nan" not in out and "inf " not in out


# --- JSON -------------------------------------------------------------------------------------


@pytest.mark.parametrize("command", ["run", "check"])
def test_json_is_valid_and_deterministic(capsys, scripts, command) -> None:
    files = [scripts["passing"]] if command == "run" else [scripts["passing"], scripts["failing"]]
    first_status, first, _ = run(capsys, command, *files, "--json")
    second_status, second, _ = run(capsys, command, *files, "--json")
    assert first == second and first_status == second_status  # same bytes, run twice
    data = json.loads(first)
    assert isinstance(data, dict if command == "run" else list)
    assert "NaN" not in first and "Infinity" not in first


def test_run_json_content(capsys, scripts) -> None:
    status, out, _ = run(capsys, "run", scripts["infinity"], "--json")
    data = json.loads(out)
    assert data["units"] == "mm" and "sign_convention" in data
    image = data["first_order"]["image distance"]
    assert image["value"] is None and "infinity" in image["why"]
    focal = data["first_order"]["focal length"]
    assert focal == {"value": 50.0, "unit": "mm"}
    assert data["boundaries"][0]["name"] == "l"
    assert data["expectations"][0]["passed"] is False


def test_check_json_content_and_errors(capsys, scripts) -> None:
    status, out, _ = run(capsys, "check", scripts["failing"], scripts["syntax"], "--json")
    assert status == 2
    failing, syntax = json.loads(out)
    assert (failing["passed"], failing["failed"]) == (2, 1)
    failed = [e for e in failing["expectations"] if not e["passed"]][0]
    assert failed["line"] == 9 and "expected 90 mm ± 0.5 mm" in failed["message"]
    assert syntax["file"] == scripts["syntax"] and "2:1" in syntax["error"]


# --- as a program ------------------------------------------------------------------------


def test_python_dash_m_and_no_sympy_for_numeric_checks(scripts) -> None:
    code = ("import sys\nfrom layoutlang.cli import main\nstatus = main(sys.argv[1:])\n"
            "print('sympy loaded' if 'sympy' in sys.modules else 'no sympy')\nsys.exit(status)\n")
    done = subprocess.run([sys.executable, "-c", code, "check", scripts["passing"]],
                          capture_output=True, text=True, timeout=60,
                          env={**os.environ, "PYTHONIOENCODING": "utf-8"})
    assert done.returncode == 0, done.stderr
    assert done.stdout.splitlines()[-1] == "no sympy"
    done = subprocess.run([sys.executable, "-m", "layoutlang", "check", scripts["failing"]],
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 1 and "1 of 3 expectations FAIL" in done.stdout


def test_run_json_carries_the_setting(capsys) -> None:
    import json
    from pathlib import Path

    from layoutlang.cli import main

    example = Path(__file__).resolve().parent.parent / "examples" / "barcode_reader.lay"
    main(["run", "--json", str(example)])
    setting = json.loads(capsys.readouterr().out)["setting"]
    assert setting["object"] == {"at_infinity": False, "distance_before_first_vertex": 300.0,
                                 "height": 40.0}
    assert setting["stop"] == {"after_boundary": None, "offset": -2.0, "size_kind": "diameter",
                               "size": 10.0}
    assert setting["image_plane"]["at_focus"] is True
    assert "stop: 2 mm before the first boundary, diameter 10 mm" in setting["words"]
