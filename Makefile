# Two entry points for a fresh machine: `make demo` and `make test` (see README.md).
PYTHON ?= python3
VENV   ?= .venv
PY     := $(VENV)/bin/python
WHEEL_VENV := .venv-wheel

.PHONY: demo test examples wheel-check bench clean

$(VENV)/.installed: pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -e ".[test]"
	touch $@

demo: $(VENV)/.installed
	$(VENV)/bin/layoutlang run examples/conveyor_camera.lay

test: $(VENV)/.installed
	$(PY) -m pytest
	$(MAKE) --no-print-directory examples wheel-check

# Every example must hold its own expectations and keep the canonical layout.
examples: $(VENV)/.installed
	$(VENV)/bin/layoutlang check examples/*.lay
	$(VENV)/bin/layoutlang format --check examples/*.lay stdlib/*.lay

# Proves grammar/ and stdlib/ are found from a built wheel, not only from the source tree.
wheel-check: $(VENV)/.installed
	rm -rf build/wheel $(WHEEL_VENV)
	$(PY) -m pip wheel --quiet --no-deps -w build/wheel .
	$(PYTHON) -m venv $(WHEEL_VENV)
	$(WHEEL_VENV)/bin/python -m pip install --quiet build/wheel/layoutlang-*.whl
	cd build && ../$(WHEEL_VENV)/bin/layoutlang check ../examples/*.lay

bench: $(VENV)/.installed
	$(PY) bench/run.py

clean:
	rm -rf $(VENV) $(WHEEL_VENV) build dist
