package benchmarks

import (
	"bytes"
	"encoding/csv"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/seine-ml/seine/encode"
)

// boundRows returns the triage rows as raw values (numbers, the
// agent_family text, missing cells) in the file's column order, with the
// file's header, for a Binding.
func boundRows(b *testing.B) (header []string, rows [][]encode.Value) {
	b.Helper()
	raw, err := os.ReadFile(filepath.Join(triageDir, "sessions.csv"))
	if err != nil {
		b.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(raw)).ReadAll()
	if err != nil {
		b.Fatal(err)
	}
	header = recs[0]
	for _, rec := range recs[1:] {
		row := make([]encode.Value, len(rec))
		for j, cell := range rec {
			switch v, err := strconv.ParseFloat(cell, 64); {
			case cell == "":
				row[j] = encode.Missing
			case err == nil:
				row[j] = encode.Number(v)
			default:
				row[j] = encode.Text(cell)
			}
		}
		rows = append(rows, row)
	}
	return header, rows
}

// BenchmarkPredictBound is one single-row prediction from raw values
// through the model's encoder on the bound-order path (nn.Model.Bind):
// numbers, a category as text, missing cells filled by their rules, every
// value checked. Target: 0 allocs/op, within a few hundred nanoseconds of
// BenchmarkPredict.
func BenchmarkPredictBound(b *testing.B) {
	m, _, _ := triageModel(b)
	header, rows := boundRows(b)
	bind, err := m.Bind(header)
	if err != nil {
		b.Fatal(err)
	}
	if _, err := bind.Predict(rows[0]); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		k, err := bind.Predict(rows[i])
		if err != nil {
			b.Fatal(err)
		}
		sinkInt += k
		if i++; i == len(rows) {
			i = 0
		}
	}
}
