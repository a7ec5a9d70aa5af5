# coolmargin: every target creates the virtualenv and installs the project first.
PYTHON ?= python3
VENV ?= .venv
BIN := $(VENV)/bin
HOST ?= 127.0.0.1
PORT ?= 8000

.PHONY: install run test bench lint load clean

$(BIN)/.installed: pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip
	$(BIN)/python -m pip install --quiet -e '.[test]'
	touch $@

install: $(BIN)/.installed

run: install
	$(BIN)/coolmargin db upgrade
	$(BIN)/coolmargin import --if-empty --author demo examples/plant.json
	@echo "coolmargin: http://$(HOST):$(PORT)  (reference /docs, contract /openapi.yaml, demo examples/README.md)"
	@echo "  plant: curl -s http://$(HOST):$(PORT)/v1/vessels; curl -s -X POST 'http://$(HOST):$(PORT)/v1/screenings?format=csv' -H 'Content-Type: application/json' -d '{\"step\": {\"ref\": \"AC-7-FAST\"}}'"
	@echo "  demo: curl -s -X POST 'http://$(HOST):$(PORT)/v1/scale-up?format=csv' -H 'Content-Type: application/json' -d @examples/scale_up_demo.json"
	@echo "        $(BIN)/coolmargin scale-up examples/scale_up_demo.json"
	COOLMARGIN_BIND=$(HOST):$(PORT) $(BIN)/gunicorn --config docker/gunicorn.conf.py 'api.wsgi:app'

test: install
	$(BIN)/python -m pytest

bench: install
	$(BIN)/python tests/benchmarks/bench.py

load: install
	$(BIN)/python tests/benchmarks/load.py

lint: install
	$(BIN)/python -m compileall -q api calc schemas tests
	$(BIN)/python -m pytest -q tests/test_openapi.py

clean:
	rm -rf $(VENV) build *.egg-info .pytest_cache .hypothesis
