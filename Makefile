# Tracewright: the two commands a user needs are `make run` and `make test` (README.md).
GO        ?= go
WASM_EXEC := $(shell $(GO) env GOROOT)/lib/wasm/go_js_wasm_exec
DEMO      := testdata/workshop.csv

.PHONY: run page test vet test-native test-wasm cli bench bench-analyses bench-page fuzz demo clean

## run: build the page (dist/tracewright.html) and serve dist/ on 127.0.0.1:8080
run: page
	$(GO) run ./tools/serve -dir dist -addr 127.0.0.1:8080

## page: build dist/tracewright.html, one self-contained file (prints its sha256)
page:
	$(GO) run ./tools/bundle -out dist/tracewright.html

## test: vet, then every test natively (browser tests included: they need /usr/bin/chromium,
## and skip without it outside CI) and the core's tests under GOOS=js GOARCH=wasm (node)
test: vet test-native test-wasm

vet:
	$(GO) vet ./...
	GOOS=js GOARCH=wasm $(GO) vet ./core/... ./wasm/

test-native:
	$(GO) test -count=1 ./...

test-wasm:
	GOOS=js GOARCH=wasm $(GO) test -count=1 -exec="$(WASM_EXEC)" ./core/...

## cli: build bin/tracewright and bin/loggen
cli:
	$(GO) build -trimpath -o bin/tracewright ./tools/tracewright
	$(GO) build -trimpath -o bin/loggen ./tools/loggen

## bench: intake, memory and timestamp benchmarks (figures side by side with encoding/csv)
bench:
	$(GO) test -run '^$$' -bench . -benchmem -benchtime 3x ./core/intake/
	$(GO) test -run '^$$' -bench . -benchmem ./core/timestamp/

## bench-analyses: discovery, layout against Graphviz dot, alignments and forecasts (each prints
## its figures and ratios; the alignment and forecast runs take several minutes)
bench-analyses:
	$(GO) test -run '^$$' -bench . -benchtime 1x ./core/discovery/
	$(GO) test -run '^$$' -bench 'AgainstDot|Layout' -benchtime 1x ./core/layout/
	$(GO) test -run '^$$' -bench 'AlignVariants|Workshop' -benchtime 1x -timeout 30m ./core/conformance/
	$(GO) test -run '^$$' -bench Predict -benchtime 1x ./core/predict/

## bench-page: the page in headless chromium: start-up, a 1M-event CSV to the overview, peak
## memory, and the same intake natively in the same run; then the intake alone compiled for
## wasm in chromium and under node beside native
bench-page:
	$(GO) test -run '^$$' -bench 'BenchmarkPage|BenchmarkIntakeInChromium' -benchtime 1x -timeout 20m ./tools/bundle/

## fuzz: a short run of every fuzz target (FUZZTIME each)
FUZZTIME ?= 30s
fuzz:
	$(GO) test -run '^$$' -fuzz '^FuzzRecords$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzReadCSV$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzReadXES$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzXMLScanner$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzEncodingName$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzCSVRoundTrip$$' -fuzztime $(FUZZTIME) ./core/export/
	$(GO) test -run '^$$' -fuzz '^FuzzXESRoundTrip$$' -fuzztime $(FUZZTIME) ./core/export/
	$(GO) test -run '^$$' -fuzz '^FuzzParse$$' -fuzztime $(FUZZTIME) ./core/timestamp/
	$(GO) test -run '^$$' -fuzz '^FuzzParse$$' -fuzztime $(FUZZTIME) ./core/tree/
	$(GO) test -run '^$$' -fuzz '^FuzzReadPNML$$' -fuzztime $(FUZZTIME) ./core/petri/

## demo: rewrite the demo logs in testdata/ from the generator (deterministic)
demo: cli
	./bin/loggen --events 6000 --seed 2026 --noise 0.05 --start-times --cases-per-day 3 \
		--csv testdata/workshop.csv --xes testdata/workshop.xes.gz --truth testdata/workshop.truth.json --detail

clean:
	rm -rf bin dist
