# Two commands do all set-up on a fresh machine:
#   make serve   build the demo handbook and serve it on 127.0.0.1:8000
#   make test    install what the tests need and run every tier
PY      ?= python3
VENV    := .venv
BIN     := $(VENV)/bin
PORT    ?= 8000
export NO_MKDOCS_2_WARNING := 1
DEPS    := $(VENV)/.deps-stamp
NODE    := node_modules/.stamp
SYSTEM  := $(VENV)/.system-stamp
WHEELS  := .cache/wheels/.stamp

.PHONY: serve build test test-fast lint bench system clean

$(BIN)/python:
	$(PY) -m venv $(VENV)

$(DEPS): requirements-dev.txt pyproject.toml calc/pyproject.toml | $(BIN)/python
	$(BIN)/pip install -q --disable-pip-version-check -r requirements-dev.txt -e ./calc -e .
	touch $@

# Debian packages: ngspice (reference simulator) and chromium (browser tests).
$(SYSTEM): | $(BIN)/python
	@if ! command -v ngspice >/dev/null || ! test -x /usr/bin/chromium; then \
	  if [ "$$(id -u)" = 0 ]; then apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq ngspice chromium >/dev/null; \
	  else sudo apt-get update -qq && sudo DEBIAN_FRONTEND=noninteractive apt-get install -y -qq ngspice chromium >/dev/null; fi; fi
	touch $@

$(NODE): package.json package-lock.json
	npm ci --no-audit --no-fund --loglevel=error
	touch $@

# pure wheels of pytest and hypothesis for the Pyodide tier
$(WHEELS): tests/pyodide/requirements.txt | $(DEPS)
	rm -rf .cache/wheels && mkdir -p .cache/wheels
	$(BIN)/pip download -q --disable-pip-version-check --only-binary=:all: --python-version 3.14 --platform any \
	  --implementation py --abi none -d .cache/wheels -r tests/pyodide/requirements.txt
	touch $@

system: $(SYSTEM)

build: $(DEPS) $(NODE)
	LAMPBOOK_SITE_URL=$${LAMPBOOK_SITE_URL:-http://127.0.0.1:$(PORT)/} $(BIN)/mkdocs build --strict

serve: build
	@echo "Serving the handbook on http://127.0.0.1:$(PORT)/"
	@echo "Offline use on a phone needs HTTPS (any HTTPS static host) or localhost on the device itself;"
	@echo "plain http from this machine on the shop network computes but is not kept offline."
	$(BIN)/python -m http.server $(PORT) --bind 127.0.0.1 --directory site

lint: $(DEPS) $(NODE)
	$(BIN)/ruff check calc lampbook tests bench
	$(BIN)/ruff format --check calc lampbook tests bench
	$(BIN)/mypy
	node_modules/.bin/eslint --max-warnings 0 .
	$(BIN)/python -m lampbook.protocoltypes --check
	node_modules/.bin/tsc --noEmit -p .
	node_modules/.bin/tsc --noEmit -p tsconfig.worker.json
	node_modules/.bin/tsc --noEmit -p tsconfig.node.json

test: $(DEPS) $(NODE) $(SYSTEM) $(WHEELS) lint
	$(BIN)/python -m pytest

test-fast: $(DEPS)
	$(BIN)/python -m pytest -m "not spice and not pyodide and not browser"

bench: $(DEPS) $(NODE) $(SYSTEM)
	$(BIN)/python bench/run.py
	$(BIN)/python bench/plan.py

clean:
	rm -rf site build .pytest_cache .hypothesis
