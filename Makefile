# Two commands a newcomer needs: `make demo` and `make test`. Both build .venv first.
PYTHON ?= python3
VENV   ?= .venv
PY     := $(VENV)/bin/python
STAMP  := $(VENV)/.installed

.PHONY: demo serve screenshots test bench bench-scale loadtest fuzz clean

# Dashboard server options: make demo PORT=8866; make serve HOST=0.0.0.0 PORT=8866 POOL=2 VOILA_TOKEN=...
PORT   ?= 8866
HOST   ?= 127.0.0.1
POOL   ?= 2
SNAPSHOT_DIR ?=
export VOILA_TOKEN

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -e '.[test,dashboard]'
	touch $(STAMP)

demo: $(STAMP)
	$(PY) -m convlib demo
	$(PY) -m dashboard.serve --local --port $(PORT) $(if $(SNAPSHOT_DIR),--snapshot-dir $(SNAPSHOT_DIR))

serve: $(STAMP)
	$(PY) -m dashboard.serve --host $(HOST) --port $(PORT) --pool-size $(POOL) $(if $(SNAPSHOT_DIR),--snapshot-dir $(SNAPSHOT_DIR))

screenshots: $(STAMP)
	$(PY) -m dashboard.screenshots --out screenshots

test: $(STAMP)
	$(PY) -m pytest -q

# N viewers in headless Chromium against a fresh shared server: make loadtest VIEWERS=10 DURATION=120
VIEWERS  ?= 10
DURATION ?= 120
loadtest: $(STAMP)
	$(PY) -m dashboard.loadtest --viewers $(VIEWERS) --duration $(DURATION)

# Property-based tests with the long hypothesis profile (thousands of examples per test): make fuzz
fuzz: $(STAMP)
	HYPOTHESIS_PROFILE=long $(PY) -m pytest -q -m fuzz -p no:cacheprovider --hypothesis-show-statistics --durations=0

# every benchmark records the figures of the speed table in BENCH_RECORD; the summary prints that table last
BENCH_RECORD := $(CURDIR)/benchmarks/results/latest.json
bench: export CONVLIB_BENCH_RECORD = $(BENCH_RECORD)
bench: $(STAMP)
	$(PY) -m pip install --quiet -e '.[bench]'
	rm -f $(BENCH_RECORD)
	$(PY) benchmarks/startup.py
	$(PY) benchmarks/run.py
	$(PY) benchmarks/small_calls.py
	$(PY) benchmarks/kernel_ratio.py
	$(PY) benchmarks/dashboard_latency.py
	$(PY) benchmarks/memory.py
	$(MAKE) bench-scale
	$(PY) benchmarks/summary.py --record $(BENCH_RECORD)

# the scale figure at 10^5 line-cases x 100 samples, 1 and 2 workers (about 21 minutes on 2 cores);
# `make bench SCALE_LINES=2000` (or `make bench-scale SCALE_LINES=2000`) for a run of a few minutes
SCALE_LINES ?= 100000
bench-scale: $(STAMP)
	$(PY) benchmarks/scale.py --lines $(SCALE_LINES) --baseline-lines 2000 --repeat 1

clean:
	rm -rf $(VENV) build *.egg-info .pytest_cache
