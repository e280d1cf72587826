# Warmstead: `make run` and `make test` do all set-up on a fresh machine.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
PORT   ?= 8000
HOST   ?= 127.0.0.1
## one worker per core, at most 4 (see README: several app processes)
WORKERS ?= $(shell n=$$(nproc 2>/dev/null || echo 1); [ $$n -gt 4 ] && n=4; echo $$n)
STAMP  := $(VENV)/.installed
## test processes (pytest-xdist): one per core, at most 4; each has its own SQLite files,
## PostgreSQL schema and live server
TEST_WORKERS ?= $(WORKERS)

.PHONY: run test install migrate demo browser lint bench clean

$(STAMP): pyproject.toml
	@test -x $(BIN)/python || $(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install -q --upgrade pip
	$(BIN)/python -m pip install -q -e '.[test]'
	@touch $(STAMP)

install: $(STAMP)

migrate: $(STAMP)
	$(BIN)/warmstead migrate

demo: migrate
	$(BIN)/warmstead demo

## make run: create the venv, install, migrate, load the demo house, serve on $(HOST):$(PORT)
run: demo
	$(BIN)/warmstead serve --host $(HOST) --port $(PORT) --workers $(WORKERS)

## Debian's chromium for the browser tests (never a downloaded browser build), and poppler-utils
## for reading the printed quote back (pdfinfo, pdftotext, pdftoppm)
browser:
	@missing=""; command -v chromium >/dev/null 2>&1 || missing="chromium"; \
	command -v pdftotext >/dev/null 2>&1 || missing="$$missing poppler-utils"; \
	if [ -z "$$missing" ]; then echo "chromium: $$(command -v chromium); poppler: $$(command -v pdftotext)"; \
	elif [ "$$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then \
	  (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq $$missing) \
	  || echo "$$missing could not be installed: the tests that need them will skip"; \
	else echo "$$missing not installed and cannot be installed here: the tests that need them will skip"; fi

lint: $(STAMP)
	$(BIN)/ruff check .
	$(BIN)/ruff format --check .
	$(BIN)/mypy

## coverage of server/ below which make test fails: 94 % measured on 2026-12-02, floor a few points under
COVERAGE_FLOOR ?= 90

## make test: install everything, then lint (ruff check and format, mypy), run the whole suite
## (SQLite, and PostgreSQL when reachable) with the doctests of server/physics, and report coverage
test: $(STAMP) browser
	$(BIN)/ruff check .
	$(BIN)/ruff format --check .
	$(BIN)/mypy
	$(BIN)/python -m pytest --doctest-modules tests server/physics -n $(TEST_WORKERS) \
	  --cov=server --cov-report=term:skip-covered --cov-fail-under=$(COVERAGE_FLOOR)

## make bench: the core's in-process timings (bench_core), loopback load test (compare page,
## calc/house, a bare page of the same size) and
## the weather-file reader timing; not part of make test (about two minutes)
bench: $(STAMP)
	@command -v wrk >/dev/null 2>&1 || { [ "$$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1 \
	  && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq wrk >/dev/null; } \
	  || echo "wrk is not installed: the load comes from the slower Python client"
	$(BIN)/python scripts/bench_core.py
	$(BIN)/python scripts/bench_load.py
	$(BIN)/python scripts/bench_weather.py
	$(BIN)/python scripts/bench_bills.py

clean:
	rm -rf $(VENV) var .pytest_cache .hypothesis
