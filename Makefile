# coolmargin: every target creates the virtualenv and installs what it needs first.
# Versions are pinned by docker/constraints.txt, the same file the container image uses.
PYTHON ?= python3
VENV ?= .venv
BIN := $(VENV)/bin
HOST ?= 127.0.0.1
PORT ?= 8000
CONSTRAINTS := docker/constraints.txt
PIP := $(BIN)/python -m pip install --quiet -c $(CONSTRAINTS)

.PHONY: install install-test nginx chromium run test bench lint load clean constraints

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

# Debian's nginx, for the tests that run docker/nginx.conf natively (tests/test_proxy.py); needs root or sudo.
nginx:
	@command -v nginx >/dev/null 2>&1 || test -x /usr/sbin/nginx || { \
	    SUDO=$$( [ "$$(id -u)" = 0 ] || echo sudo ); \
	    apt-cache policy nginx nginx-light | grep -q 'Candidate: [0-9]' || $$SUDO apt-get update -q; \
	    DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -q --no-install-recommends nginx; }

# Debian's headless chromium, for the test that prints an HTML report in a real browser (tests/test_reports.py).
chromium:
	@command -v chromium >/dev/null 2>&1 || { \
	    SUDO=$$( [ "$$(id -u)" = 0 ] || echo sudo ); \
	    apt-cache policy chromium | grep -q 'Candidate: [0-9]' || $$SUDO apt-get update -q; \
	    DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -q --no-install-recommends chromium; }

run: install
	$(BIN)/coolmargin db upgrade
	$(BIN)/coolmargin import --if-empty --author demo examples/plant.json
	@echo "coolmargin: http://$(HOST):$(PORT)  (reference /docs, contract /openapi.yaml, demo examples/README.md)"
	@echo "  plant: curl -s http://$(HOST):$(PORT)/v1/vessels; curl -s -X POST 'http://$(HOST):$(PORT)/v1/screenings?format=csv' -H 'Content-Type: application/json' -d '{\"step\": {\"ref\": \"AC-7-FAST\"}}'"
	@echo "  demo: curl -s -X POST 'http://$(HOST):$(PORT)/v1/scale-up?format=csv' -H 'Content-Type: application/json' -d @examples/scale_up_demo.json"
	@echo "        $(BIN)/coolmargin scale-up examples/scale_up_demo.json"
	COOLMARGIN_BIND=$(HOST):$(PORT) $(BIN)/gunicorn --config docker/gunicorn.conf.py 'api.wsgi:app'

test: install-test nginx chromium
	$(BIN)/python -m pytest

bench: install-test
	$(BIN)/python tests/benchmarks/bench.py

load: install-test
	$(BIN)/python tests/benchmarks/load.py

lint: install-test
	$(BIN)/python -m ruff check api calc schemas tests
	$(BIN)/python -m mypy
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
