# The two commands a new user needs: `make demo` and `make test`.
# Each creates or refreshes the project's virtual environment (.venv) itself.
PYTHON ?= python3
VENV := .venv
STAMP := $(VENV)/.installed

.PHONY: demo test venv clean bench

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(VENV)/bin/python -m pip install --quiet --upgrade pip
	$(VENV)/bin/python -m pip install --quiet -e '.[test]'
	touch $(STAMP)

venv: $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/vpaudit demo --out reports_demo

test: $(STAMP)
	$(VENV)/bin/python -m pytest

bench: $(STAMP)
	$(VENV)/bin/python benchmarks/run_all.py

clean:
	rm -rf $(VENV) build dist *.egg-info
