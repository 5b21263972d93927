package benchmarks

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"sync"
	"testing"
	"time"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

const triageDir = "../examples/triage"

var triage struct {
	once  sync.Once
	model *nn.Model
	file  []byte
	rows  *mat.Dense // the rows of sessions.csv, coded for the model (encode.Encoder.CodeSet)
	err   error
}

// triageModel trains the triage demo for a few iterations (prediction cost
// does not depend on how well it is trained) and returns the model, its
// file and the raw rows it was trained on.
func triageModel(b *testing.B) (*nn.Model, []byte, *mat.Dense) {
	b.Helper()
	triage.once.Do(func() {
		f, err := os.Open(filepath.Join(triageDir, "triage.yaml"))
		if err != nil {
			triage.err = err
			return
		}
		defer f.Close()
		s, err := spec.Parse(f)
		if err != nil {
			triage.err = err
			return
		}
		d, err := os.Open(filepath.Join(triageDir, "sessions.csv"))
		if err != nil {
			triage.err = err
			return
		}
		defer d.Close()
		set, err := data.ReadCSV(d, data.CSVOptions{Classes: s.Output.Classes, Columns: encode.ColumnsFor(s), MissingTokens: s.MissingTokens})
		if err != nil {
			triage.err = err
			return
		}
		res, err := train.Train(context.Background(), s, set, train.Options{Limits: optim.Limits{Iterations: 5}})
		if err != nil {
			triage.err = err
			return
		}
		var buf bytes.Buffer
		if _, err := res.Model.WriteTo(&buf); err != nil {
			triage.err = err
			return
		}
		coded, err := res.Model.Encoder().CodeSet(set)
		if err != nil {
			triage.err = err
			return
		}
		triage.model, triage.file, triage.rows = res.Model, buf.Bytes(), coded
	})
	if triage.err != nil {
		b.Fatal(triage.err)
	}
	return triage.model, triage.file, triage.rows
}

// BenchmarkPredict is one single-row Model.Predict on the triage model
// (16 → 24 tanh → 5 softmax): target 0 allocs/op and under 2 µs.
func BenchmarkPredict(b *testing.B) {
	m, _, rows := triageModel(b)
	r, _ := rows.Dims()
	sinkInt = m.Predict(rows.RawRowView(0))
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sinkInt += m.Predict(rows.RawRowView(i))
		if i++; i == r {
			i = 0
		}
	}
}

// BenchmarkProbabilities is one single-row Model.Probabilities into a
// reused dst.
func BenchmarkProbabilities(b *testing.B) {
	m, _, rows := triageModel(b)
	r, _ := rows.Dims()
	dst := make([]float64, m.NumClasses())
	m.Probabilities(dst, rows.RawRowView(0))
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		sinkFloat += m.Probabilities(dst, rows.RawRowView(i))[0]
		if i++; i == r {
			i = 0
		}
	}
}

// BenchmarkProbabilitiesBatch is Model.ProbabilitiesBatch of 100,000 rows
// (the triage rows repeated) into a reused dst: target ≥ 10⁶ rows/s.
func BenchmarkProbabilitiesBatch(b *testing.B) {
	const n = 100_000
	m, _, rows := triageModel(b)
	r, c := rows.Dims()
	x := mat.NewDense(n, c, nil)
	for i := 0; i < n; i++ {
		copy(x.RawRowView(i), rows.RawRowView(i%r))
	}
	dst := mat.NewDense(n, m.NumClasses(), nil)
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		m.ProbabilitiesBatch(dst, x)
	}
	per := b.Elapsed() / time.Duration(b.N)
	b.ReportMetric(n/per.Seconds(), "rows/s")
}

// BenchmarkReadModel is nn.ReadModel of the triage model file from memory.
func BenchmarkReadModel(b *testing.B) {
	_, file, _ := triageModel(b)
	b.SetBytes(int64(len(file)))
	b.ReportAllocs()
	for b.Loop() {
		m, err := nn.ReadModel(bytes.NewReader(file))
		if err != nil {
			b.Fatal(err)
		}
		sinkInt += m.NumClasses()
	}
}
