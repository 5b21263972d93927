package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/train"
)

func TestProgressTerminal(t *testing.T) {
	var b bytes.Buffer
	pr := newProgress(&b, true, 300)
	pr.step(train.Progress{Step: optim.Step{Iter: 1, Cost: 1.5}, HoldoutAccuracy: 0.5})
	pr.step(train.Progress{Step: optim.Step{Iter: 2, Cost: 1.4}, HoldoutAccuracy: 0.5}) // within 100 ms: not redrawn
	pr.step(train.Progress{Step: optim.Step{Iter: 300, Cost: 0.2154}, HoldoutAccuracy: 0.941})
	pr.done()
	got := b.String()
	lines := strings.Split(got, "\r")
	require.Len(t, lines, 3, "want two redraws, got %q", got)
	require.Equal(t, "", lines[0], "want two redraws, got %q", got)
	assert.True(t, strings.HasPrefix(lines[1], "[....................]    1/300  cost 1.5  holdout 50.0%  "), "first bar %q", lines[1])
	assert.True(t, strings.HasPrefix(lines[2], "[####################]  300/300  cost 0.2154  holdout 94.1%  "), "last bar %q", lines[2])
	assert.True(t, strings.HasSuffix(got, "\n"), "last bar %q does not end the line", lines[2])
}

func TestProgressPlainAndQuiet(t *testing.T) {
	var b bytes.Buffer
	pr := newProgress(&b, false, 100)
	for i := 1; i <= 100; i++ {
		pr.step(train.Progress{Step: optim.Step{Iter: i, Cost: 1}, HoldoutAccuracy: math.NaN()})
	}
	pr.done()
	// A fast run writes only the first line: later lines need 2 s to pass.
	got := b.String()
	assert.True(t, strings.HasPrefix(got, "iteration 1/100: cost 1, "), "plain progress %q", got)
	assert.Equal(t, 1, strings.Count(got, "\n"), "lines of plain progress %q", got)
	quiet := newProgress(nil, true, 100)
	quiet.step(train.Progress{Step: optim.Step{Iter: 1}})
	quiet.done() // must not panic or write
}

// TestMultilabelAndBinary trains on the small fixtures (separable by
// construction, so the fit is exact) and checks evaluate and predict for a
// multi-label and a one-unit sigmoid model.
func TestMultilabelAndBinary(t *testing.T) {
	dir := t.TempDir()
	tags := filepath.Join(dir, "tags.seine.json")
	r := seine(t, "train", "-spec", "testdata/tags.yaml", "-data", "testdata/tags.csv", "-out", tags, "-iterations", "200", "-quiet")
	require.Equal(t, 0, r.code, "train tags: status; stderr %q", r.stderr)
	r = seine(t, "evaluate", "-model", tags, "-data", "testdata/tags.csv", "-json", "-threshold", "0.4")
	var rep struct {
		Rows       int      `json:"rows"`
		Hamming    *float64 `json:"hamming_loss"`
		Confusion  [][]int  `json:"confusion"`
		Threshold  float64  `json:"threshold"`
		Multilabel bool     `json:"multilabel"`
		Accuracy   float64  `json:"accuracy"`
	}
	require.Equal(t, 0, r.code, "evaluate: status; stderr %q", r.stderr)
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &rep), "evaluate: stderr %q", r.stderr)
	// The tags are the signs of the features: a net of 4 tanh units fits
	// them exactly (measured accuracy 1 after 25 iterations).
	assert.Equal(t, 60, rep.Rows, "multi-label report %+v", rep)
	if assert.NotNil(t, rep.Hamming, "multi-label report %+v", rep) {
		assert.LessOrEqual(t, *rep.Hamming, 0.05, "multi-label report: Hamming loss")
	}
	assert.Nil(t, rep.Confusion, "multi-label report: confusion")
	assert.Equal(t, 0.4, rep.Threshold, "multi-label report: threshold")
	assert.True(t, rep.Multilabel, "multi-label report %+v", rep)
	assert.GreaterOrEqual(t, rep.Accuracy, 0.9, "multi-label report: accuracy")
	r = seine(t, "evaluate", "-model", tags, "-data", "testdata/tags.csv")
	assert.Contains(t, r.stdout, "Hamming loss", "multi-label text report")
	assert.NotContains(t, r.stdout, "confusion", "multi-label text report")
	r = seine(t, "evaluate", "-model", tags, "-data", "testdata/tags.csv", "-plot", filepath.Join(dir, "c.png"))
	assert.Equal(t, 2, r.code, "-plot of a multi-label model: status")
	r = seine(t, "predict", "-model", tags, "-data", "testdata/tags.csv")
	recs, _ := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	if assert.Equal(t, 61, len(recs), "multi-label predict: lines, starting %v", recs[:min(4, len(recs))]) {
		assert.Equal(t, "classes", recs[0][0], "multi-label predict: header")
		assert.Equal(t, "a|b|c", recs[1][0], "multi-label predict: row 1")
		assert.Equal(t, "c", recs[3][0], "multi-label predict: row 3")
	}

	bin := filepath.Join(dir, "binary.seine.json")
	r = seine(t, "train", "-spec", "testdata/binary.yaml", "-data", "testdata/binary.csv", "-out", bin, "-iterations", "200", "-quiet")
	require.Equal(t, 0, r.code, "train binary: status; stderr %q", r.stderr)
	r = seine(t, "predict", "-model", bin, "-data", "testdata/binary.csv", "-probabilities", "-digits", "0")
	recs, _ = csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	require.Equal(t, 61, len(recs), "binary predict: lines of %q", r.stdout)
	require.Equal(t, "class,p_no,p_yes", strings.Join(recs[0], ","), "binary predict: header")
	for _, rec := range recs[1:] {
		p0, _ := strconv.ParseFloat(rec[1], 64)
		p1, _ := strconv.ParseFloat(rec[2], 64)
		// p_no = 1 − p_yes, rounded once: 1e-15 is a few units of 2⁻⁵².
		assert.InDelta(t, 1, p0+p1, 1e-15, "binary row %v: p_no + p_yes", rec)
		assert.Equal(t, rec[0] == "yes", p1 > p0, "binary row %v: class against the larger probability", rec)
	}
}
