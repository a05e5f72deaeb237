# Build, test and demonstration targets for mixwell. Only Go is needed (the
# version is in go.mod); "make test" is exactly what CI runs (.ci/run).

GO ?= go

.PHONY: build test test-long bench demo scipy-check vet fmt-check

# The first target is the default: "make" builds everything.
build:
	$(GO) build ./...

# The full CI suite. It is kept fast (well under 20 minutes on two cores);
# long convergence studies are skipped unless MIXWELL_LONG=1 (see test-long).
test:
	$(GO) test ./...

# Everything, including the long convergence studies.
test-long:
	MIXWELL_LONG=1 $(GO) test -run . -timeout 60m ./...

# All benchmarks, no tests. Compare runs with benchstat (see DEVELOPERS.md).
bench:
	$(GO) test -run '^$$' -bench . -benchmem ./...

# The embedded demonstration case (README, "Try it"): a few seconds, results
# and the case itself in ./mixwell-demo.
demo:
	$(GO) run ./cmd/mixwell demo --out mixwell-demo

# Cross-check of the sparse direct solver against Debian's python3-scipy.
# Installs nothing: the test skips, and says so, when scipy is missing.
scipy-check:
	MIXWELL_SCIPY_CHECK=1 $(GO) test ./solver/ -run Scipy -v

vet:
	$(GO) vet ./...

# Fails and lists the files when any Go file is not gofmt-formatted.
fmt-check:
	@files=$$(gofmt -l .); \
	if [ -n "$$files" ]; then echo "these files need gofmt:"; echo "$$files"; exit 1; fi
