"""Output of `layoutlang derive`: text, LaTeX, numpy code, JSON, Markdown, and the command."""

from __future__ import annotations

import json
import time

import pytest

from layoutlang import loads
from layoutlang.cli import main
from layoutlang.symbolic import render

SCRIPT = """\
layout "one boundary"
symbols n1 n2 R a positive
nominal n1 = 1, n2 = 1.5, R = 20, a = 100
medium outside index n1
medium inside index n2
object a before
start in outside
surface radius R into inside
derive image distance, conjugate equation
solve R so that image distance = 40
sensitivity of image distance to R, a
"""


@pytest.fixture()
def outcome():
    return render.carry_out(loads(SCRIPT, "one.lay"))


def test_text(outcome) -> None:
    out = render.text(outcome)
    assert "n1/a + n2/s' = (n2 - n1)/R" in out
    assert "at nominal: 100 mm" in out
    assert "R = 200/19 ≈ 10.5263   (exact; physical)" in out
    assert "mm per mm" in out
    assert render.text(render.carry_out(loads(SCRIPT, "one.lay"))) == out  # deterministic


def test_latex(outcome) -> None:
    out = render.latex(outcome)
    assert r"\frac{n_{1}}{a} + \frac{n_{2}}{s'} = \frac{n_{2} - n_{1}}{R}" in out
    assert r"\section*{Design equations}" in out


def test_python_code_runs_and_agrees(outcome) -> None:
    import numpy as np

    namespace: dict = {}
    exec(compile(render.python_code(outcome), "derived.py", "exec"), namespace)
    a = np.array([100.0, 200.0])
    got = namespace["image_distance"](1.0, 1.5, 20.0, a)
    # s' = n2 a R/(a (n2 - n1) - n1 R) (Hecht, 2017, Optics, 5th ed., eq. 5.8, from memory)
    assert np.allclose(got, 1.5 * a * 20 / (a * 0.5 - 20))


def test_json(outcome) -> None:
    document = json.loads(render.json_text(outcome))
    first = document["derived"][0]
    assert first["quantity"] == "image distance" and first["at_nominal"] == 100.0
    assert document["solutions"][0]["roots"][0]["physical"] is True
    assert [s["symbol"] for s in document["sensitivities"]] == ["R", "a"]


def test_markdown_and_report_rows(outcome) -> None:
    out = render.markdown(outcome)
    assert out.startswith("## Design equations")
    assert "$$" in out and "| image distance | R |" in out
    rows = render.equation_rows(loads(SCRIPT, "one.lay"))
    assert rows[0][0] == "image distance" and "(= 100 mm at nominal)" in rows[0][1]


def _many_surfaces(k: int) -> str:
    lines = ["symbols " + " ".join(f"R{i}" for i in range(k)) + " real",
             "symbols " + " ".join([f"n{i}" for i in range(k)] + [f"d{i}" for i in range(k - 1)]
                                   + ["a"]) + " positive",
             "object a before", "start in air"]
    lines += [f"medium m{i} index n{i}" for i in range(k)]
    for i in range(k):
        lines.append(f"surface s{i} radius R{i} into m{i}")
        if i < k - 1:
            lines.append(f"gap d{i}")
    return "\n".join(lines + ["derive image distance, focal length"]) + "\n"


def test_big_layouts_give_named_intermediates_quickly() -> None:
    start = time.perf_counter()
    out = render.text(render.carry_out(loads(_many_surfaces(10))))
    assert time.perf_counter() - start < 20  # generous: shared test machines
    assert "shown with named intermediates instead" in out
    assert "phi_10 = " in out and "s' = n9*(-A*tau_0 - B)/(C*tau_0 + D)" in out


def test_command(tmp_path, capsys) -> None:
    script = tmp_path / "one.lay"
    script.write_text(SCRIPT)
    for option in ([], ["--latex"], ["--python"], ["--json"], ["--markdown"]):
        assert main(["derive", str(script), *option]) == 0
    out = capsys.readouterr().out
    assert "def image_distance(" in out


def test_command_errors(tmp_path, capsys) -> None:
    plain = tmp_path / "plain.lay"
    plain.write_text("object 100 before\nstart in air\nlens focal length 50\n")
    assert main(["derive", str(plain)]) == 2
    assert "declares no symbols" in capsys.readouterr().err
    bad = tmp_path / "bad.lay"
    bad.write_text("symbols R\nsolve R so that image distance = 4\nstart in air\n"
                   "surface radius R into air\n")
    assert main(["derive", str(bad)]) == 1  # the image distance of an object at infinity


def test_structured_code_agrees_with_the_numeric_engine() -> None:
    from layoutlang.engines.firstorder import first_order

    k = 8
    text = _many_surfaces(k)
    values = {f"R{i}": (-1) ** i * (30 + 5 * i) for i in range(k)}
    values.update({f"n{i}": 1.5 + 0.02 * i for i in range(k)})
    values.update({f"d{i}": 2 + i for i in range(k - 1)})
    values["a"] = 250
    text = text.replace("object a before", "nominal " + ", ".join(
        f"{name} = {value}" for name, value in values.items()) + "\nobject a before")
    program = loads(text)
    outcome = render.carry_out(program)
    namespace: dict = {}
    exec(compile(render.python_code(outcome), "derived.py", "exec"), namespace)
    import inspect

    function = namespace["image_distance"]
    args = [values[name] for name in inspect.signature(function).parameters]
    expected = first_order(program.system)["image distance"]
    assert abs(function(*args) - expected) <= 1e-9 * (1 + abs(expected))
