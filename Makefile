# specgen: the two commands a fresh machine needs are `make demo` and `make test`.
PYTHON ?= python3
VENV   := .venv
PY     := $(VENV)/bin/python
STAMP  := $(VENV)/.installed

.PHONY: demo test lint bench sysdeps install clean

# System libraries WeasyPrint needs (Pango, HarfBuzz, fontconfig) and the PDF tools the tests use.
sysdeps:
	@sh tools/sysdeps.sh

$(STAMP): pyproject.toml
	@sh tools/sysdeps.sh
	@test -x $(PY) || $(PYTHON) -m venv $(VENV)
	@$(PY) -m pip install -q --upgrade pip
	@$(PY) -m pip install -q -e '.[test]'
	@touch $(STAMP)

install: $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/specgen demo --out out/demo

test: $(STAMP)
	$(PY) -m pytest

# ruff (rules in pyproject.toml) over the package, tests, tools and benchmarks; mypy over the package
# (strict flags on physics and design, in pyproject.toml)
lint: $(STAMP)
	$(VENV)/bin/ruff check specgen tests tools bench
	$(VENV)/bin/mypy specgen

bench: $(STAMP)
	$(PY) bench/run.py

clean:
	rm -rf $(VENV) out build *.egg-info
