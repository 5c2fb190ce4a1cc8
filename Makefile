# Stresslens: set up and run.
#
#   make run       set up (first time ~30 s), then open the GUI on the main sample;
#                  with no display, solve it headless and write a screenshot and a report
#   make test      set up, then run the test suite (slow checks deselected)
#   make test-all  the same with the slow checks too
#   make bench     the solver benchmark (figures as ratios against a same-run baseline)
#   make docs      regenerate the README's pictures under docs/
#   make setup     only the set-up: Debian libraries Qt needs, .venv, the project
#
# The set-up is idempotent: a stamp in .venv keyed by a hash of pyproject.toml makes a
# second run take well under a second.  As root it installs the missing Debian
# packages itself; otherwise it names them and stops.

SHELL := /bin/bash
.DEFAULT_GOAL := run

PYTHON ?= python3
VENV := .venv
BIN := $(VENV)/bin
SAMPLE ?= sample_layouts/bench_supply_terminal.layout.json
OUT := out

# python3-venv (for ensurepip) and the libraries the PySide6 wheel links directly
# (QtCore needs glib; QtGui and the offscreen platform need the rest).
DEB_PACKAGES := libglib2.0-0 libegl1 libgl1 libx11-6 libdbus-1-3 libfontconfig1 \
                libfreetype6 libxkbcommon0

PYPROJECT_HASH := $(shell sha256sum pyproject.toml 2>/dev/null | cut -c1-16)
STAMP := $(VENV)/.stresslens-installed-$(PYPROJECT_HASH)

.PHONY: setup system-packages run test test-all docs bench clean-venv

setup: system-packages $(STAMP)

system-packages:
	@missing=""; \
	if command -v dpkg-query >/dev/null 2>&1; then \
	  for p in $(DEB_PACKAGES); do \
	    dpkg-query -W -f='$${Status}' "$$p" 2>/dev/null | grep -q 'install ok installed' \
	      || missing="$$missing $$p"; \
	  done; \
	fi; \
	if ! $(PYTHON) -c 'import ensurepip, venv' >/dev/null 2>&1; then missing="$$missing python3-venv"; fi; \
	if [ -z "$$missing" ]; then exit 0; fi; \
	if [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then \
	  echo "Installing missing Debian packages:$$missing"; \
	  export DEBIAN_FRONTEND=noninteractive; \
	  apt-get update -qq && apt-get install -y -qq --no-install-recommends $$missing; \
	else \
	  echo "Stresslens needs these Debian packages, which are missing:$$missing"; \
	  echo "Install them with:  sudo apt-get install --no-install-recommends$$missing"; \
	  exit 1; \
	fi

$(STAMP): pyproject.toml
	@$(PYTHON) -c 'import sys; sys.exit(sys.version_info < (3, 10))' \
	  || { echo "Stresslens needs Python 3.10 or newer; $(PYTHON) is $$($(PYTHON) -V 2>&1)"; exit 1; }
	@if [ ! -x $(BIN)/pip ]; then \
	  echo "Creating $(VENV) ..."; \
	  rm -rf $(VENV); \
	  $(PYTHON) -m venv $(VENV) || { rm -rf $(VENV); echo "could not create $(VENV)"; exit 1; }; \
	fi
	@echo "Installing Stresslens and its test tools into $(VENV) (about 30 s the first time) ..."
	$(BIN)/python -m pip install --quiet --disable-pip-version-check -e '.[test]'
	@rm -f $(VENV)/.stresslens-installed-*
	@touch $@

run: setup
	@if [ -n "$$DISPLAY$$WAYLAND_DISPLAY" ]; then \
	  echo "Opening Stresslens on $(SAMPLE)"; \
	  exec $(BIN)/stresslens $(SAMPLE); \
	fi; \
	echo "No display (DISPLAY and WAYLAND_DISPLAY are unset): running the main job headless."; \
	mkdir -p $(OUT); \
	export QT_QPA_PLATFORM=offscreen MPLBACKEND=Agg; \
	step() { echo; echo "\$$ stresslens $$*"; $(BIN)/stresslens "$$@" || exit $$?; }; \
	step solve $(SAMPLE); \
	step $(SAMPLE) --screenshot $(OUT)/main_window.png; \
	step report $(SAMPLE) -o $(OUT)/report.pdf; \
	echo; echo "Headless results are in $(CURDIR)/$(OUT)/:"; \
	ls -l $(OUT)/main_window.png $(OUT)/report.pdf

# pytest exits 5 when it collected no test: that is a failure here, never a silent pass.
PYTEST_NO_TESTS_IS_FAILURE = rc=$$?; if [ $$rc = 5 ]; then \
	  echo "pytest collected no tests: failing"; exit 1; fi; exit $$rc

test: setup
	@$(BIN)/python -m pytest; $(PYTEST_NO_TESTS_IS_FAILURE)

test-all: setup
	@$(BIN)/python -m pytest -m 'slow or not slow'; $(PYTEST_NO_TESTS_IS_FAILURE)

# The pictures in the README: the editor window on the main sample and its report figure.
docs: setup
	QT_QPA_PLATFORM=offscreen MPLBACKEND=Agg $(BIN)/stresslens $(SAMPLE) \
	  --screenshot docs/main_window.png --size 1400x900
	QT_QPA_PLATFORM=offscreen MPLBACKEND=Agg $(BIN)/stresslens report $(SAMPLE) \
	  -o docs/report.png

bench: setup
	$(BIN)/python -m solver.bench

clean-venv:
	rm -rf $(VENV)
