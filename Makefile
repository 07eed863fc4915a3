# The two commands of the README: `make demo` and `make test`. Everything else is a helper.
.PHONY: setup build demo test bench screenshot demo-terrain

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

test: setup
	$(CARGO) test --workspace --no-fail-fast

bench: setup
	$(CARGO) bench --workspace

# Workbench screenshots under Xvfb into docs/screenshots/.
screenshot: build
	@scripts/screenshot.sh

demo-terrain: build
	$(QB) make-demo-terrain --out demo-terrain
