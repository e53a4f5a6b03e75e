# dimerpath: two commands set everything up on a fresh Debian/Ubuntu machine.
#   make run    install what is missing, build, open the GUI on the demo design
#   make test   install what is missing, then every check CI runs
SHELL := /bin/bash
export PATH := $(PATH):/usr/local/go/bin
export LANG := C.UTF-8

# scripts/go runs the Go release go.mod names: the go on PATH when it is new
# enough, else that release fetched from the Go module proxy (see the script).
GO      ?= ./scripts/go
BIN     := bin/dimerpath
# Run apt-get through sudo unless we are root already.
SUDO    := $(shell [ "$$(id -u)" = 0 ] || echo sudo)
# cgo and the GL/X11 headers build the Fyne GUI; xvfb, xauth and imagemagick
# run and screenshot it headless; poppler-utils reads exported PDFs back;
# python3-gdspy, an independent GDSII library, reads back the GDSII files
# dimerpath writes (export/gds_gdspy_test.go); curl, unzip and ca-certificates
# let scripts/go fetch Go where the machine has none (or too old a one).
DEB_PKGS := gcc pkg-config libgl1-mesa-dev libx11-dev libxcursor-dev libxrandr-dev \
            libxinerama-dev libxi-dev libxxf86vm-dev xvfb xauth imagemagick poppler-utils \
            python3-gdspy curl unzip ca-certificates

.PHONY: all run test bench build deps toolchain lint fuzz clean

all: build

deps:
	@missing=""; \
	for p in $(DEB_PKGS); do \
	  dpkg-query -W -f='$${Status}' $$p 2>/dev/null | grep -q "install ok installed" || missing="$$missing $$p"; \
	done; \
	if [ -n "$$missing" ]; then \
	  echo "dimerpath: installing missing Debian packages:$$missing"; \
	  $(SUDO) apt-get update -qq && \
	  $(SUDO) env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends $$missing; \
	fi
	@$(GO) version
	@$(GO) mod download

# The Go that builds dimerpath, installed by scripts/go when the machine has
# none new enough (deps does the same after the system packages).
toolchain:
	@$(GO) version

build: deps
	$(GO) build -o $(BIN) .

run: build
	./$(BIN)

lint:
	@out=$$("$$($(GO) env GOROOT)/bin/gofmt" -l $$(git ls-files '*.go' 2>/dev/null || find . -name '*.go')); \
	if [ -n "$$out" ]; then echo "gofmt would change:"; echo "$$out"; exit 1; fi
	$(GO) vet ./...
	@# The README names the Go release go.mod needs.
	@want=$$(awk '$$1 == "go" {print $$2}' go.mod); grep -q "Go $$want or newer" README.md || \
	  { echo "README.md does not say \"Go $$want or newer\", the release go.mod needs"; exit 1; }
	@# go.mod and go.sum list exactly what the code imports.
	@$(GO) mod tidy -diff >/dev/null || { echo "go.mod or go.sum is not tidy: run go mod tidy"; $(GO) mod tidy -diff; exit 1; }
	@# Only app/ may import Fyne; the pure packages stay headless.
	@bad=$$($(GO) list -deps ./lattice/... ./planner/... ./export/... ./internal/... | grep '^fyne.io/' || true); \
	if [ -n "$$bad" ]; then echo "pure packages import Fyne:"; echo "$$bad"; exit 1; fi
	@# The editor and the renderer are Fyne-free, tests included, so they
	@# build and test without cgo or a display; the renderer knows no editor.
	@bad=$$($(GO) list -deps -test ./app/editor/... ./app/render/... | grep '^fyne.io/' || true); \
	if [ -n "$$bad" ]; then echo "app/editor or app/render imports Fyne:"; echo "$$bad"; exit 1; fi
	@bad=$$($(GO) list -deps ./app/render/... | grep '^dimerpath/app/editor' || true); \
	if [ -n "$$bad" ]; then echo "app/render imports the editor"; exit 1; fi
	@bad=$$($(GO) list -deps ./lattice/... | grep '^dimerpath/planner' || true); \
	if [ -n "$$bad" ]; then echo "lattice imports planner"; exit 1; fi
	@# The route engine stands alone: no dimerpath package but itself and
	@# internal/blocks, the core-spreading helper that imports none.
	@bad=$$($(GO) list -deps ./planner/route/... | grep '^dimerpath/' | grep -v '^dimerpath/planner/route' | grep -vx 'dimerpath/internal/blocks' || true); \
	if [ -n "$$bad" ]; then echo "planner/route imports dimerpath packages: $$bad"; exit 1; fi

test: deps lint build
	$(GO) test -count=1 ./...
	./.ci/smoke

bench: deps
	$(GO) test -run '^$$' -bench . -benchmem ./...
	$(GO) run ./planner/route/internal/yardstick

# Fuzz every file reader for FUZZTIME each (default 20s).
FUZZTIME ?= 20s
fuzz: deps
	@for pkg in $$($(GO) list ./...); do \
	  for f in $$($(GO) test -list '^Fuzz' $$pkg | grep '^Fuzz'); do \
	    echo "== $$pkg $$f"; $(GO) test -run '^$$' -fuzz "^$$f$$" -fuzztime $(FUZZTIME) $$pkg || exit 1; \
	  done; \
	done

clean:
	rm -rf bin
