# coolmargin: every target creates the virtualenv and installs what it needs first.
# Versions are pinned by docker/constraints.txt, the same file the container image uses.
PYTHON ?= python3
VENV ?= .venv
BIN := $(VENV)/bin
HOST ?= 127.0.0.1
PORT ?= 8000
CONSTRAINTS := docker/constraints.txt
PIP := $(BIN)/python -m pip install --quiet -c $(CONSTRAINTS)

.PHONY: install install-test run test bench lint load clean constraints

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)

# Serving needs only the project's own dependencies; the tests add theirs.
$(BIN)/.installed: pyproject.toml $(CONSTRAINTS) | $(BIN)/python
	$(PIP) -e .
	touch $@

$(BIN)/.installed-test: $(BIN)/.installed
	$(PIP) -e '.[test]'
	touch $@

install: $(BIN)/.installed
install-test: $(BIN)/.installed-test

run: install
	@echo "coolmargin: http://$(HOST):$(PORT)  (reference /docs, contract /openapi.yaml, demo examples/README.md)"
	@echo "  demo: curl -s -X POST 'http://$(HOST):$(PORT)/v1/scale-up?format=csv' -H 'Content-Type: application/json' -d @examples/scale_up_demo.json"
	@echo "        $(BIN)/coolmargin scale-up examples/scale_up_demo.json"
	COOLMARGIN_BIND=$(HOST):$(PORT) $(BIN)/gunicorn --config docker/gunicorn.conf.py 'api.wsgi:app'

test: install-test
	$(BIN)/python -m pytest

bench: install-test
	$(BIN)/python tests/benchmarks/bench.py

load: install-test
	$(BIN)/python tests/benchmarks/load.py

lint: install-test
	$(BIN)/python -m compileall -q api calc schemas tests
	$(BIN)/python -m pytest -q tests/test_openapi.py

# Re-pin after changing dependencies in pyproject.toml: a fresh virtualenv, the project with its tests, frozen.
constraints:
	rm -rf $(VENV)-pin && $(PYTHON) -m venv $(VENV)-pin
	$(VENV)-pin/bin/python -m pip install --quiet '.[test]'
	( echo "# Pinned versions for make and docker/Dockerfile; regenerate with 'make constraints'."; \
	  $(VENV)-pin/bin/python -m pip freeze --exclude coolmargin ) > $(CONSTRAINTS)
	rm -rf $(VENV)-pin

clean:
	rm -rf $(VENV) build *.egg-info .pytest_cache .hypothesis
