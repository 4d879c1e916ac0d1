#!/usr/bin/env bash
# Installs what is needed, builds cvdeck, meshes a sample case and prints
# where its deck is.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
go build -o cvdeck ./cmd/cvdeck
out=${1:-out/demo}
mkdir -p "$out"
./cvdeck init bump-channel "$out"
status=0
./cvdeck mesh "$out/bump-channel.yaml" -o "$out/bump-channel" || status=$?
echo "deck written to $out/bump-channel (exit code $status)"
