#!/bin/sh
# Regenerates the demo recordings in this folder (synthetic: invented ward, invented patient codes).
# Run from the repository root: sh samples/make.sh
set -e
run() { cargo run --release --quiet -- synth "$@"; }
run --scenario normal --out samples/ward3-bed2-normal.edf --patient W3-B2 \
    --label "Ward 3 - bed 2, synthetic demo" --truth samples/ward3-bed2-normal.truth.json
run --scenario long-qt --out samples/ward3-bed5-long-qt.edf --patient W3-B5 \
    --label "Ward 3 - bed 5, synthetic demo" --truth samples/ward3-bed5-long-qt.truth.json
run --scenario ectopics --out samples/ward3-bed4-ectopics.edf --patient W3-B4 \
    --label "Ward 3 - bed 4, synthetic demo" --truth samples/ward3-bed4-ectopics.truth.json
run --scenario irregular --seconds 60 --leads 3 --out samples/ward3-bed7-irregular.edf --patient W3-B7 \
    --label "Ward 3 - bed 7, synthetic demo" --truth samples/ward3-bed7-irregular.truth.json
run --scenario noisy --out samples/ward3-bed9-noisy.edf --patient W3-B9 \
    --label "Ward 3 - bed 9, synthetic demo" --truth samples/ward3-bed9-noisy.truth.json
