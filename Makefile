# heliotag: build, test, demo, benchmarks. Run `make help` for the targets.
GO      ?= go
BIN     := bin/heliotag
OUT     := out
PKGS    := ./...
# Packages whose concurrency is checked under the race detector in `make test`.
RACE_PKGS := ./pipeline/... ./enrich/... ./io/... ./job/... ./cmd/...

.PHONY: help build test test-short lint demo bench bench-quick fuzz clean

help:
	@echo "make build        build $(BIN)"
	@echo "make test         vet, gofmt check, all tests (seed corpora), race detector on the concurrent packages"
	@echo "make demo         enrich the invented demo data into $(OUT)/ and print counts"
	@echo "make bench        end-to-end and micro benchmarks (minutes)"
	@echo "make bench-quick  a quick benchmark pass (under a minute)"
	@echo "make fuzz         run each fuzz target for FUZZTIME (default 20s)"
	@echo "make lint         go vet and gofmt check"

build:
	$(GO) build -o $(BIN) ./cmd/heliotag

lint:
	$(GO) vet $(PKGS)
	@fmt_out=$$(gofmt -l $$(git ls-files '*.go' 2>/dev/null || find . -name '*.go')); \
	if [ -n "$$fmt_out" ]; then echo "gofmt needed on:"; echo "$$fmt_out"; exit 1; fi

test: lint
	$(GO) test -count=1 $(PKGS)
	$(GO) test -count=1 -race $(RACE_PKGS)
	$(GO) test -count=1 -race -run 'Grid' ./solar/

demo: build
	@mkdir -p $(OUT)
	$(BIN) enrich testdata/demo/marrowfield_collisions.csv \
		--date crash_date --time crash_time --tz America/Chicago \
		--force -o $(OUT)/marrowfield_collisions_sun.csv
	@sh scripts/counts.sh $(OUT)/marrowfield_collisions_sun.csv sun_light_condition sun_phase
	$(BIN) enrich testdata/demo/hollin_ridge_detections.csv \
		--force -o $(OUT)/hollin_ridge_detections_sun.csv
	@sh scripts/counts.sh $(OUT)/hollin_ridge_detections_sun.csv sun_light_condition sun_phase
	$(BIN) enrich testdata/demo/hollin_ridge_package --tables observations,media \
		--force -o $(OUT)/hollin_ridge_package_sun
	@sh scripts/counts.sh $(OUT)/hollin_ridge_package_sun/observations-sun.csv sun_light_condition sun_time_note
	@sh scripts/counts.sh $(OUT)/hollin_ridge_package_sun/media-sun.csv sun_light_condition

FUZZTIME ?= 20s
fuzz:
	@sh scripts/fuzz.sh $(FUZZTIME)

# End-to-end runs of the command on generated data and the micro-benchmarks
# beside the code, in one script (benchmarks/run.sh: a markdown table with
# ratios to a passthrough measured in the same run, and the targets).
# bench appends a dated entry to benchmarks/RESULTS.md; bench-quick only with RECORD=1.
bench-quick:
	bash benchmarks/run.sh quick

bench:
	bash benchmarks/run.sh full

clean:
	rm -rf bin $(OUT)
