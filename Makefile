# Every target creates .venv and installs what it needs on first use.
PYTHON ?= python3
VENV := .venv
PY := $(VENV)/bin/python
STAMP := $(VENV)/.installed

.PHONY: demo test soak lint format bench clean

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -e '.[dev]'
	touch $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/losslane demo

test: $(STAMP)
	$(PY) -m pytest -q
	$(VENV)/bin/ruff check src tests benchmarks
	$(VENV)/bin/ruff format --check src tests benchmarks

# the hostile-input properties with thousands of examples each (minutes, not seconds)
soak: $(STAMP)
	LOSSLANE_SOAK=1 $(PY) -m pytest -q tests/test_hostile_input.py --hypothesis-show-statistics

lint: $(STAMP)
	$(VENV)/bin/ruff check src tests benchmarks
	$(VENV)/bin/ruff format --check src tests benchmarks

format: $(STAMP)
	$(VENV)/bin/ruff check --fix src tests benchmarks
	$(VENV)/bin/ruff format src tests benchmarks

bench: $(STAMP)
	$(PY) benchmarks/run.py

clean:
	rm -rf $(VENV) losslane-demo .pytest_cache .ruff_cache
