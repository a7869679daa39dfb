# Two set-up commands on a fresh machine (Python 3.11 and the package registries):
#   make demo   - install planpack into .venv and build the demo plans into out/ (site and cards)
#   make test   - install the test extras into .venv and run the whole test suite
PYTHON ?= python3
VENV ?= .venv
BIN := $(VENV)/bin

.PHONY: demo test install install-test bench clean

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip

install: $(BIN)/python
	$(BIN)/python -m pip install --quiet -e .

install-test: $(BIN)/python
	$(BIN)/python -m pip install --quiet -e '.[test]'
	@# NeQuick-G (the tests' independent check of the CCIR maps) declares numpy<2, which its C code does not use
	$(BIN)/python -m pip install --quiet --no-deps 'nequick==1.0.0'

demo: install
	$(BIN)/planpack check plans/
	@if $(BIN)/planpack build --help >/dev/null 2>&1; then $(BIN)/planpack build plans/ --out out --force; fi

test: install-test
	$(BIN)/python -m pytest -q

bench: install
	@for b in bench/bench_*.py; do echo "== $$b"; $(BIN)/python $$b || exit 1; done

clean:
	rm -rf $(VENV) out .pytest_cache .hypothesis
