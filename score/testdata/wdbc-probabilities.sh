#!/bin/sh
# Makes wdbc-probabilities.csv: the class probabilities that a small model
# trained by seine gives every row of wdbc.csv, beside the true class.
# Run from the repository root: sh score/testdata/wdbc-probabilities.sh
# (training is deterministic for the spec's seed, so the file is
# reproduced bit for bit; the Go tests only read the committed CSV).
set -eu
d=score/testdata
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
go run ./cmd/seine train -spec $d/wdbc-logistic.yaml -data $d/wdbc.csv -holdout 0.3 -quiet -out "$tmp/m.seine.json"
go run ./cmd/seine predict -model "$tmp/m.seine.json" -data $d/wdbc.csv -label diagnosis -probabilities -out "$tmp/pred.csv"
# truth = the last column of wdbc.csv; the probabilities = columns 2 and 3 of the predictions.
cut -d, -f31 $d/wdbc.csv | paste -d, - "$tmp/pred.csv" | cut -d, -f1,3,4 | sed '1s/^diagnosis/truth/' > $d/wdbc-probabilities.csv
