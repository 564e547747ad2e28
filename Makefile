# Tracewright: the two commands a user needs are `make run` and `make test` (README.md).
GO        ?= go
WASM_EXEC := $(shell $(GO) env GOROOT)/lib/wasm/go_js_wasm_exec
DEMO      := testdata/workshop.csv

.PHONY: run test vet test-native test-wasm cli bench fuzz demo clean

## run: build the command-line tool and show the overview of the demo log
run: cli
	./bin/tracewright inspect $(DEMO)

## test: vet, then every test natively and the core's tests under GOOS=js GOARCH=wasm (node)
test: vet test-native test-wasm

vet:
	$(GO) vet ./...
	GOOS=js GOARCH=wasm $(GO) vet ./core/...

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

## fuzz: a short run of every fuzz target (FUZZTIME each)
FUZZTIME ?= 30s
fuzz:
	$(GO) test -run '^$$' -fuzz '^FuzzRecords$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzReadCSV$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzReadXES$$' -fuzztime $(FUZZTIME) ./core/intake/
	$(GO) test -run '^$$' -fuzz '^FuzzCSVRoundTrip$$' -fuzztime $(FUZZTIME) ./core/export/
	$(GO) test -run '^$$' -fuzz '^FuzzXESRoundTrip$$' -fuzztime $(FUZZTIME) ./core/export/
	$(GO) test -run '^$$' -fuzz '^FuzzParse$$' -fuzztime $(FUZZTIME) ./core/timestamp/

## demo: rewrite the demo logs in testdata/ from the generator (deterministic)
demo: cli
	./bin/loggen --events 6000 --seed 2026 --noise 0.05 --start-times --cases-per-day 3 \
		--csv testdata/workshop.csv --xes testdata/workshop.xes.gz --truth testdata/workshop.truth.json --detail

clean:
	rm -rf bin dist
