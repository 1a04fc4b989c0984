# lidscope build, install and test targets.
#
#   make demo    build, then run the main job on the built-in synthetic demo scenario
#   make test    install what is missing, then vet and run every test
#   make build   build bin/lidscope
#   make deps    install the Debian packages lidscope and its tests need (when missing)
#   make bench   run the Go benchmarks
#   make man     write the man pages of every command into man/man1 (not committed)
#
# `make deps` needs root (or sudo) on a Debian/Ubuntu machine; it installs only
# packages that are missing.

GO        ?= go
BIN       := bin/lidscope
# C netCDF library and tools; CDO and Debian's python3-xarray/cftime/scipy/sklearn are
# independent reference tools the tests compare against.
DEB_BUILD := gcc pkg-config libnetcdf-dev netcdf-bin
DEB_TEST  := cdo udunits-bin python3-xarray python3-cftime python3-netcdf4 python3-scipy python3-numpy python3-yaml python3-colorspacious python3-sklearn
# Real NetCDF files nobody here wrote (Debian's libncarg-data), fetched and
# unpacked into a temporary folder for the tests; never committed.
REALDATA  ?= $(or $(TMPDIR),/tmp)/lidscope-realdata

.PHONY: all build deps deps-build realdata test vet demo bench clean sample man

all: build

deps-build:
	@./scripts/apt-need $(DEB_BUILD)

deps: deps-build
	@./scripts/apt-need $(DEB_TEST)

build: deps-build
	$(GO) build -o $(BIN) ./cmd/lidscope

realdata:
	@./scripts/fetch-realdata $(REALDATA)

vet: deps-build
	@test -z "$$(gofmt -l $$(git ls-files '*.go' 2>/dev/null || find . -name '*.go'))" || { echo "gofmt needed:"; gofmt -l .; exit 1; }
	$(GO) vet ./...

test: deps realdata vet
	LIDSCOPE_REALDATA=$(REALDATA) $(GO) test -count=1 ./...

demo: build
	./$(BIN) demo --out demo-out --force

bench: deps-build
	$(GO) test -run '^$$' -bench . -benchmem ./...

# Man pages from the command tree (cobra's doc package); `make test` checks
# that they build (TestManPages in cmd/lidscope). Read with: man -l man/man1/lidscope.1
MANDIR := man/man1
man: build
	./$(BIN) man-pages --out $(MANDIR)

clean:
	rm -rf bin demo-out man

# A small synthetic sample (fixtures/sample/sample.cdl) compiled with ncgen and inspected.
SAMPLE := $(or $(TMPDIR),/tmp)/lidscope-sample.nc
sample: build
	ncgen -k nc4 -o $(SAMPLE) fixtures/sample/sample.cdl
	./$(BIN) inspect $(SAMPLE)
