# ph-dossier — set-up and everyday commands. Every target makes .venv itself.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin

.PHONY: demo test bench system system-test clean help

help:
	@echo "make demo   build the demo dossier (creates .venv, installs, builds)"
	@echo "make test   run the tests (installs Chromium and poppler-utils if missing, creates .venv, installs with the test extra)"
	@echo "make bench  run the benchmarks and print the figures"

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)

$(VENV)/.installed: pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install --quiet -e .
	touch $@

$(VENV)/.installed-test: pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install --quiet -e '.[test]'
	touch $@ $(VENV)/.installed

system:
	@tools/system-packages runtime

# The tests need a browser and pdftoppm as well; without them the browser and
# PDF-page tests skip (and fail the run when CI=true, see tests/conftest.py).
system-test:
	@tools/system-packages test

demo: system $(VENV)/.installed
	$(BIN)/dossier build methods -o output
	@echo "open output/index.html in a browser, or run: $(BIN)/dossier serve output"

test: system-test $(VENV)/.installed-test
	$(BIN)/python -m pytest -n auto --dist loadgroup

bench: $(VENV)/.installed-test
	$(BIN)/python -m tests.benchmarks.run

clean:
	rm -rf $(VENV) output/*/ build dist *.egg-info .pytest_cache .hypothesis
