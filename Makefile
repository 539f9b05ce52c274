# Reticle: two set-up commands, `make run` and `make test`.
#
# `make run` installs the system libraries the desktop program needs when
# they are missing (Debian or Ubuntu: apt-get, with sudo when not root;
# elsewhere it prints what to install), builds, and runs the program on the
# bundled demo scan. `make test` checks formatting, vets and runs every test,
# again under the race detector for the packages that run work in
# goroutines, and the seed corpus of every fuzz target.

GO        ?= go
DEMO      := assets/demo/kiln-trial-07.xy
BIN       := bin
# Debian/Ubuntu packages that Fyne's OpenGL driver builds against.
SYSTEM_PKGS := gcc pkg-config libgl1-mesa-dev xorg-dev
# Packages the tests use: the desktop program's (its tests build it) and
# pdftotext, which reads the reports' text layer.
TEST_PKGS := $(SYSTEM_PKGS) poppler-utils
FUZZTIME  ?= 10s

.PHONY: run test test-long race build deps test-deps install-pkgs screenshot fmt-check vet static unit fuzz-seeds fuzz bench bench-score clean

# Fyne cannot parse the C/POSIX locale: use English for those only.
run: deps build
	@case "$$LANG" in ""|C|C.*|POSIX) export LANG=en_US.UTF-8;; esac; $(BIN)/reticle-desktop $(DEMO)

build:
	$(GO) build -o $(BIN)/reticle ./cmd/reticle
	$(GO) build -o $(BIN)/reticle-desktop ./app

# Pictures of every step of the real window under Xvfb, on the demo scan
# and on one benchmark scan (dark theme), into $(SHOTS).
SHOTS      ?= shots
BENCH_SCAN ?= ../shared/bench/public/scan016.csv
XDISPLAY   ?= :97
screenshot: deps build
	@$(MAKE) --no-print-directory install-pkgs PKGS="xvfb imagemagick" WHY="Xvfb and ImageMagick"
	mkdir -p $(SHOTS)
	@Xvfb $(XDISPLAY) -screen 0 1400x950x24 >/dev/null 2>&1 & xpid=$$!; sleep 1; \
	status=0; \
	DISPLAY=$(XDISPLAY) LANG=en_US.UTF-8 $(BIN)/reticle-desktop --screenshots $(SHOTS) $(DEMO) || status=1; \
	if [ -f $(BENCH_SCAN) ]; then \
	  DISPLAY=$(XDISPLAY) LANG=en_US.UTF-8 $(BIN)/reticle-desktop --theme dark --screenshots $(SHOTS) $(BENCH_SCAN) || status=1; \
	fi; \
	kill $$xpid; exit $$status

test: test-deps fmt-check vet static unit race fuzz-seeds

fmt-check:
	@out=$$(gofmt -l $$(git ls-files '*.go' 2>/dev/null || find . -name '*.go')); \
	if [ -n "$$out" ]; then echo "gofmt needed on:"; echo "$$out"; exit 1; fi

vet:
	$(GO) vet ./...

# The headless command must build without cgo.
static:
	CGO_ENABLED=0 $(GO) build -o /dev/null ./cmd/reticle

unit:
	LANG=en_US.UTF-8 $(GO) test -count=1 ./...

# The race detector on the packages that run work in goroutines.
race:
	LANG=en_US.UTF-8 $(GO) test -race -count=1 -timeout 20m ./app/... ./analysis/... ./report/... ./cmd/...

# The full-size property and Monte Carlo tests (RETICLE_LONG=1), which
# take far longer than make test's.
test-long:
	LANG=en_US.UTF-8 RETICLE_LONG=1 $(GO) test -count=1 -timeout 6h ./...

# The seed corpus of every fuzz target, run on its own so the log shows it.
fuzz-seeds:
	$(GO) test -count=1 -run '^Fuzz' ./...

# Real fuzzing, FUZZTIME per target: make fuzz FUZZTIME=1m
fuzz:
	@for pkg in $$($(GO) list ./...); do \
	  for f in $$($(GO) test -list '^Fuzz' $$pkg | grep '^Fuzz'); do \
	    echo "== $$pkg $$f"; $(GO) test -run '^$$' -fuzz "^$$f$$" -fuzztime $(FUZZTIME) $$pkg || exit 1; \
	  done; \
	done

bench:
	$(GO) test -run '^$$' -bench . -benchmem ./...

# Public benchmark scores (needs ../shared/bench and python3).
bench-score: build
	python3 ../shared/bench/peakscore.py --cmd '$(BIN)/reticle peaks --json' --data ../shared/bench/public
	python3 ../shared/bench/score.py --cmd '$(BIN)/reticle index --json' --data ../shared/bench/public

deps:
	@$(MAKE) --no-print-directory install-pkgs PKGS="$(SYSTEM_PKGS)" WHY="Fyne's requirements: a C compiler, pkg-config and the OpenGL and X11 development headers"

test-deps:
	@$(MAKE) --no-print-directory install-pkgs PKGS="$(TEST_PKGS)" WHY="Fyne's requirements and poppler-utils (pdftotext)"

# Installs the Debian/Ubuntu packages in PKGS that are missing.
install-pkgs:
	@missing=""; \
	if command -v dpkg-query >/dev/null 2>&1; then \
	  for p in $(PKGS); do \
	    dpkg-query -W -f='$${Status}' $$p 2>/dev/null | grep -q 'install ok installed' || missing="$$missing $$p"; \
	  done; \
	  if [ -n "$$missing" ]; then \
	    echo "installing:$$missing"; \
	    if [ "$$(id -u)" = 0 ]; then SUDO=""; else SUDO=sudo; fi; \
	    $$SUDO apt-get update -qq && DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -qq $$missing; \
	  fi; \
	else \
	  echo "not a Debian or Ubuntu system: install $(WHY) yourself"; \
	fi

clean:
	rm -rf $(BIN)
