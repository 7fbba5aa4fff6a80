#!/bin/sh
# Regenerates the demo recordings in this folder (synthetic: invented ward, invented patient codes).
# Run from the repository root: sh samples/make.sh
set -e
run() { cargo run --release --quiet -- synth "$@"; }
run --scenario normal --out samples/ward3-bed2-normal.edf --patient W3-B2 --truth samples/ward3-bed2-normal.truth.json
run --scenario long-qt --out samples/ward3-bed5-long-qt.edf --patient W3-B5 --truth samples/ward3-bed5-long-qt.truth.json
run --scenario ectopics --out samples/ward3-bed4-ectopics.edf --patient W3-B4 --truth samples/ward3-bed4-ectopics.truth.json
run --scenario irregular --seconds 60 --leads 3 --out samples/ward3-bed7-irregular.edf --patient W3-B7 --truth samples/ward3-bed7-irregular.truth.json
run --scenario noisy --out samples/ward3-bed9-noisy.edf --patient W3-B9 --truth samples/ward3-bed9-noisy.truth.json
