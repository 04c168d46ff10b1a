# Two commands do all set-up: `make run` and `make test`. Both are idempotent.
PY      ?= python3
VENV    := .venv
BIN     := $(VENV)/bin
STAMP   := $(VENV)/.installed
PORT    ?= 8501
DEMO    ?= data_demo/mineral_coating.loadline.json

.PHONY: run test bench fuzz lint browser clean

$(STAMP): pyproject.toml
	test -d $(VENV) || $(PY) -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip
	$(BIN)/pip install --quiet -e '.[test]'
	touch $(STAMP)

# Debian's chromium for the browser tests; never `playwright install` (it cannot download here).
browser:
	@command -v chromium >/dev/null 2>&1 || { \
	  if [ "$$(id -u)" = 0 ]; then apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null; \
	  else echo "chromium missing: run 'sudo apt-get install chromium' for the browser tests"; fi; }

run: $(STAMP)
	LOADLINE_SCENARIO=$(DEMO) $(BIN)/python -m app.serve --server.port $(PORT) --server.address 127.0.0.1

test: $(STAMP) browser
	$(BIN)/ruff check predictor app tests
	$(BIN)/python -m pytest -q -n 2 || [ $$? -eq 5 ]

bench: $(STAMP) browser
	$(BIN)/python tests/benchmarks/run.py --markdown artifacts/bench.md

fuzz: $(STAMP)
	HYPOTHESIS_PROFILE=fuzz LOADLINE_APP_FUZZ_STEPS=400 $(BIN)/python -m pytest -q \
	    tests/test_fuzz.py tests/app/test_app_fuzz.py

lint: $(STAMP)
	$(BIN)/ruff check predictor app tests

clean:
	rm -rf $(VENV) .pytest_cache .hypothesis
