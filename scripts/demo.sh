#!/usr/bin/env bash
# Installs what is needed, builds cvdeck, meshes a sample case and a sample
# sweep, and prints where the decks are.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
go build -o cvdeck ./cmd/cvdeck
out=${1:-out/demo}
mkdir -p "$out"
rm -f "$out/bump-channel.yaml"
./cvdeck init bump-channel "$out" >/dev/null
status=0
./cvdeck mesh "$out/bump-channel.yaml" -o "$out/bump-channel" --format cgns,vtu,preview,png,manifest || status=$?
./cvdeck sweep samples/sweeps/nozzle-throat-exit.yaml -o "$out/nozzle-sweep" -j "$(nproc)" || status=$?
echo
echo "deck written to $out/bump-channel (preview: $out/bump-channel/preview.png)"
echo "sweep written to $out/nozzle-sweep (summary: $out/nozzle-sweep/summary.csv)"
exit $status
