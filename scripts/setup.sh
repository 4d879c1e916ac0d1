#!/usr/bin/env bash
# Installs what cvdeck needs on a fresh Debian machine (run as root): the CGNS
# library for cgo, and the reference tools the tests compare against (the
# CGNS checker and converter, the HDF5 tools, the VTK library's Python
# bindings, scipy, and a one-node Slurm scheduler for the sweep scale-out
# test). Then it fetches the Go modules.
set -euo pipefail
packages=(gcc libcgns-dev cgns-convert hdf5-tools python3-vtk9 python3-scipy slurm-wlm munge)
missing=()
for p in "${packages[@]}"; do
	dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if ((${#missing[@]})); then
	export DEBIAN_FRONTEND=noninteractive
	apt-get update -qq
	apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
cd "$(dirname "$0")/.."
go mod download
