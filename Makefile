# Epochpoint: the two everyday commands are `make run` and `make test`.
# Everything is installed into .venv from a clean clone; nothing outside the tree is touched.

PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
# Written after a successful install; pyproject.toml being newer triggers a re-install.
STAMP  := $(VENV)/.epochpoint-installed

DEMO_TARGETS := sample_targets/loma_candil_targets.csv
DEMO_SITE    := sample_targets/loma_candil.toml
DEMO_PLAN    := sample_targets/loma_candil_plan.json

# Extra pytest arguments, e.g. `make test PYTEST_ARGS="-k refraction -x"`.
PYTEST_ARGS ?=
# Two pytest workers, a test file each (its INDI server and tests stay together): the mount
# tests wait on the simulator's slews, so the run takes about 7.5 min instead of 13.
PYTEST_WORKERS ?= -n 2 --dist loadfile

export PIP_DISABLE_PIP_VERSION_CHECK := 1

.PHONY: install test run package bench clean distclean

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)

$(STAMP): pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install -e '.[dev]'
	touch $@

install: $(STAMP)

# pytest exits 5 when it collected no test: say so loudly, but do not fail the build.
test: $(STAMP)
	@rc=0; QT_QPA_PLATFORM=offscreen $(BIN)/python -m pytest -q $(PYTEST_WORKERS) $(PYTEST_ARGS) || rc=$$?; \
	if [ $$rc -eq 5 ]; then \
		echo "************************************************************"; \
		echo "*** make test: pytest collected NO TESTS (exit 5).       ***"; \
		echo "*** Treated as success; add tests under tests/.          ***"; \
		echo "************************************************************"; \
		exit 0; \
	fi; \
	exit $$rc

# The desktop app on the invented observatory's demo plan (night of 2027-01-19).
run: $(STAMP) $(DEMO_PLAN)
	$(BIN)/epochpoint gui $(DEMO_PLAN)

# The demo plan file is built from the demo site and target list (invented demo data).
$(DEMO_PLAN): $(DEMO_TARGETS) $(DEMO_SITE) sample_targets/build_demo_plan.py | $(STAMP)
	$(BIN)/python sample_targets/build_demo_plan.py $@

# A one-folder desktop bundle in dist/epochpoint/ (PyInstaller, installed into .venv), then
# the bundle's smoke test. Slow (minutes); not part of `make test`.
package: $(STAMP)
	$(BIN)/python -m pip install 'pyinstaller>=6.0'
	$(BIN)/pyinstaller --noconfirm --clean --distpath dist --workpath build/pyinstaller \
		packaging/epochpoint.spec
	packaging/smoke_test.sh dist/epochpoint/epochpoint

bench: $(STAMP)
	@if [ -f benchmarks/run_all.py ]; then \
		$(BIN)/python benchmarks/run_all.py; \
	else \
		echo "make bench: benchmarks/run_all.py does not exist yet; nothing to run."; \
	fi

# Removes build output and caches; keeps .venv (use `make distclean` to remove it too).
clean:
	rm -rf build dist .pytest_cache .hypothesis $(STAMP)
	find . -path ./$(VENV) -prune -o -name '*.egg-info' -prune -exec rm -rf {} + \
		-o -name __pycache__ -prune -exec rm -rf {} +

distclean: clean
	rm -rf $(VENV)
