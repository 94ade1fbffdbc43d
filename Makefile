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
	# the docstrings' examples, each with its published source's value (alembic's migration
	# scripts run only inside alembic)
	$(VENV)/bin/python -m pytest --doctest-modules audit --ignore=audit/archive/migrations -q

bench: $(STAMP)
	for b in thermo_accuracy detection literature sheets report_speed scaling large_input batch_speed; do \
		echo "== benchmarks/$$b.py"; $(VENV)/bin/python benchmarks/$$b.py || exit 1; done

clean:
	rm -rf $(VENV) build dist *.egg-info
