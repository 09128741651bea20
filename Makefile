# One command each on a fresh clone: the virtual environment is built when missing.
PYTHON ?= python3
VENV   := .venv
PY     := $(VENV)/bin/python
PIP    := $(PY) -m pip --disable-pip-version-check -q

.PHONY: demo test test-oldest bench bench-quick lint docs clean

$(PY):
	$(PYTHON) -m venv $(VENV)

$(VENV)/.base: pyproject.toml | $(PY)
	$(PIP) install -e .
	touch $@

$(VENV)/.test: pyproject.toml | $(PY)
	$(PIP) install -e ".[test]"
	touch $@ $(VENV)/.base

demo: $(VENV)/.base
	$(PY) -m ionact demo

test: $(VENV)/.test
	$(PY) -m ruff check ionact tests benchmarks tools
	$(PY) -m mypy
	$(PY) -m pytest -q

OLD := .venv-oldest

test-oldest:
	test -x $(OLD)/bin/python || $(PYTHON) -m venv $(OLD)
	$(OLD)/bin/python -m pip --disable-pip-version-check -q install -r requirements-oldest.txt -e ".[test]"
	$(OLD)/bin/python -m pip --disable-pip-version-check -q install -r requirements-oldest.txt
	$(OLD)/bin/python -m pytest -q -p no:cacheprovider

bench: $(VENV)/.test
	$(PY) benchmarks/run.py

bench-quick: $(VENV)/.test
	$(PY) benchmarks/run.py --quick

docs: $(VENV)/.test
	$(PY) -m sphinx -q -W --keep-going -b html docs docs/_build/html

lint: $(VENV)/.test
	$(PY) -m ruff check ionact tests benchmarks tools

clean:
	rm -rf $(VENV) .pytest_cache .hypothesis build *.egg-info benchmarks/results.json docs/_build docs/generated $(OLD)
