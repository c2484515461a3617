# Two set-up commands (see README): `make demo` and `make test`.
# Tests pin OpenBLAS to one thread: on a small shared machine its default threads make the
# dense solves of the sheet solver many times slower (measured).
PYTHON ?= python3
VENV ?= .venv
PY := $(VENV)/bin/python
STAMP := $(VENV)/.installed

.PHONY: demo test lint bench clean

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade "pip>=25.1"
	$(PY) -m pip install --quiet -e . --group dev
	touch $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/fluxshadow demo

test: $(STAMP)
	OPENBLAS_NUM_THREADS=1 $(PY) -m pytest -q
	$(VENV)/bin/ruff check src tests benchmarks
	$(VENV)/bin/mypy

lint: $(STAMP)
	$(VENV)/bin/ruff check src tests benchmarks
	$(VENV)/bin/ruff format --check src tests benchmarks
	$(VENV)/bin/mypy

bench: $(STAMP)
	$(PY) benchmarks/run_all.py

clean:
	rm -rf $(VENV) build *.egg-info
