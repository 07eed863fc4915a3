# The two commands of the README: `make demo` and `make test`. Everything else is a helper.
.PHONY: setup build demo test bench screenshot demo-terrain fuzz cluster-check

CARGO ?= cargo
DEMO_DEM := demo-terrain/farside-patch.tif
QB := target/release/quietbowl

setup:
	@scripts/setup.sh

build: setup
	$(CARGO) build --release -p quietbowl

# Opens the workbench on the demo terrain; with no display, runs the same survey and ranking on
# the terminal instead and says so.
demo: build
	@scripts/demo.sh

# The whole suite in debug, then the tests that need release speed: the crater-survey targets
# on the whole demo patch.
test: setup
	$(CARGO) test --workspace --no-fail-fast
	$(CARGO) test --release -p quietbowl-craters --test demo_accuracy

bench: setup
	$(CARGO) bench --workspace

# Workbench screenshots under Xvfb into docs/screenshots/.
screenshot: build
	@scripts/screenshot.sh

# The Slurm path of docs/cluster.md run for real on this machine (needs root: it starts a
# single-node slurmctld, slurmd and munged of its own, and installs slurm-wlm and munge if missing).
cluster-check: build
	@scripts/cluster-check.sh

demo-terrain: build
	$(QB) make-demo-terrain --out demo-terrain

# The fuzz targets (fuzz/), each for FUZZ_SECONDS; not part of `make test`. libFuzzer's flags
# are nightly-only, and RUSTC_BOOTSTRAP=1 lets the stable toolchain accept them. New inputs go
# to fuzz/work/ (not kept); crashes to fuzz/artifacts/<target>/. See DEVELOPERS.md, "Fuzzing".
FUZZ_SECONDS ?= 60
FUZZ_TARGETS ?= criteria_parse catalogue_read survey_read
FUZZ_ARGS ?=
fuzz:
	@command -v cargo-fuzz >/dev/null 2>&1 || $(CARGO) install cargo-fuzz --locked
	@for t in $(FUZZ_TARGETS); do \
		mkdir -p fuzz/work/$$t && echo "== $$t, $(FUZZ_SECONDS) s" && \
		RUSTC_BOOTSTRAP=1 $(CARGO) fuzz run $(FUZZ_ARGS) $$t fuzz/work/$$t fuzz/corpus/$$t -- \
			-max_total_time=$(FUZZ_SECONDS) -timeout=10 -rss_limit_mb=2048 || exit 1; \
	done
