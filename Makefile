# The two commands of the README: `make run` and `make test`. Both create the
# virtual environment on first use, so a fresh clone needs only Python 3.11.
PYTHON ?= python3.11
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed

.PHONY: run test lint format bench clean

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip

# The engine's C passes are compiled by this install, so a change to them reinstalls.
$(STAMP): pyproject.toml $(wildcard worker/profiling/native/*.[ch]) | $(BIN)/python
	$(BIN)/pip install --quiet -e '.[test]'
	touch $(STAMP)

run: $(STAMP)
	$(BIN)/tidewaiter db upgrade
	$(BIN)/tidewaiter demo load
	$(BIN)/tidewaiter serve

lint: $(STAMP)
	$(BIN)/ruff check .
	$(BIN)/ruff format --check .

format: $(STAMP)
	$(BIN)/ruff format .
	$(BIN)/ruff check --fix .

test: lint
	$(BIN)/python -m pytest $(PYTEST_ARGS)

bench: $(STAMP)
	$(BIN)/python tests/perf/bench_profile.py

clean:
	rm -rf $(VENV) var .pytest_cache .ruff_cache build
	rm -f worker/profiling/native/*.so
