# ph-dossier — set-up and everyday commands. Every target makes .venv itself.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin

.PHONY: demo test bench system clean help

help:
	@echo "make demo   build the demo dossier (creates .venv, installs, builds)"
	@echo "make test   run the tests (creates .venv, installs with the test extra)"
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

demo: system $(VENV)/.installed
	@echo "== exact pH and shortcut errors for a few demo solutions =="
	$(BIN)/dossier solve --pka 4.756 --conc "10 mmol/L"
	$(BIN)/dossier solve --pka 9.21 --conc "0.1 mmol/L"
	$(BIN)/dossier solve --pka 2.148 --pka 7.198 --pka 12.35 --conc "50 mmol/L" --form 1 --activity davies
	$(BIN)/dossier solve --pka 8.072 --charge 1 --dh 47.45 --conc "50 mmol/L" --form base --strong-acid "25 mmol/L" --temperature 37

test: system $(VENV)/.installed-test
	$(BIN)/python -m pytest

bench: $(VENV)/.installed-test
	$(BIN)/python -m tests.benchmarks.run

clean:
	rm -rf $(VENV) output/*/ build dist *.egg-info .pytest_cache .hypothesis
