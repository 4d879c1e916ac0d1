#!/usr/bin/env bash
# Installs what is needed, then runs every check of the project: formatting,
# go vet, and all tests (the reference-tool comparisons and the Slurm
# integration test included; under CI=true a missing tool fails).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
unformatted=$(gofmt -l .)
if [[ -n "$unformatted" ]]; then
	echo "gofmt needed on: $unformatted" >&2
	exit 1
fi
go vet ./...
go test -count=1 -timeout 40m ./...
