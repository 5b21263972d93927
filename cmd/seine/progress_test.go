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
	if len(lines) != 3 || lines[0] != "" {
		t.Fatalf("want two redraws, got %q", got)
	}
	if !strings.HasPrefix(lines[1], "[....................]    1/300  cost 1.5  holdout 50.0%  ") {
		t.Errorf("first bar %q", lines[1])
	}
	if !strings.HasPrefix(lines[2], "[####################]  300/300  cost 0.2154  holdout 94.1%  ") || !strings.HasSuffix(got, "\n") {
		t.Errorf("last bar %q", lines[2])
	}
}

func TestProgressPlainAndQuiet(t *testing.T) {
	var b bytes.Buffer
	pr := newProgress(&b, false, 100)
	for i := 1; i <= 100; i++ {
		pr.step(train.Progress{Step: optim.Step{Iter: i, Cost: 1}, HoldoutAccuracy: math.NaN()})
	}
	pr.done()
	// A fast run writes only the first line: later lines need 2 s to pass.
	if got := b.String(); !strings.HasPrefix(got, "iteration 1/100: cost 1, ") || strings.Count(got, "\n") != 1 {
		t.Errorf("plain progress %q", got)
	}
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
	if r := seine(t, "train", "-spec", "testdata/tags.yaml", "-data", "testdata/tags.csv", "-out", tags, "-iterations", "200", "-quiet"); r.code != 0 {
		t.Fatalf("train tags: %d %q", r.code, r.stderr)
	}
	r := seine(t, "evaluate", "-model", tags, "-data", "testdata/tags.csv", "-json", "-threshold", "0.4")
	var rep struct {
		Rows       int      `json:"rows"`
		Hamming    *float64 `json:"hamming_loss"`
		Confusion  [][]int  `json:"confusion"`
		Threshold  float64  `json:"threshold"`
		Multilabel bool     `json:"multilabel"`
		Accuracy   float64  `json:"accuracy"`
	}
	if err := json.Unmarshal([]byte(r.stdout), &rep); err != nil || r.code != 0 {
		t.Fatalf("evaluate: %d %v %q", r.code, err, r.stderr)
	}
	// The tags are the signs of the features: a net of 4 tanh units fits
	// them exactly (measured accuracy 1 after 25 iterations).
	if rep.Rows != 60 || rep.Hamming == nil || *rep.Hamming > 0.05 || rep.Confusion != nil || rep.Threshold != 0.4 || !rep.Multilabel || rep.Accuracy < 0.9 {
		t.Errorf("multi-label report %+v", rep)
	}
	if r := seine(t, "evaluate", "-model", tags, "-data", "testdata/tags.csv"); !strings.Contains(r.stdout, "Hamming loss") || strings.Contains(r.stdout, "confusion") {
		t.Errorf("multi-label text report:\n%s", r.stdout)
	}
	if r := seine(t, "evaluate", "-model", tags, "-data", "testdata/tags.csv", "-plot", filepath.Join(dir, "c.png")); r.code != 2 {
		t.Errorf("-plot of a multi-label model: status %d", r.code)
	}
	r = seine(t, "predict", "-model", tags, "-data", "testdata/tags.csv")
	recs, _ := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	if len(recs) != 61 || recs[0][0] != "classes" || recs[1][0] != "a|b|c" || recs[3][0] != "c" {
		t.Errorf("multi-label predict: %d lines, %v", len(recs), recs[:min(4, len(recs))])
	}

	bin := filepath.Join(dir, "binary.seine.json")
	if r := seine(t, "train", "-spec", "testdata/binary.yaml", "-data", "testdata/binary.csv", "-out", bin, "-iterations", "200", "-quiet"); r.code != 0 {
		t.Fatalf("train binary: %d %q", r.code, r.stderr)
	}
	r = seine(t, "predict", "-model", bin, "-data", "testdata/binary.csv", "-probabilities", "-digits", "0")
	recs, _ = csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	if len(recs) != 61 || strings.Join(recs[0], ",") != "class,p_no,p_yes" {
		t.Fatalf("binary predict: %q", r.stdout)
	}
	for _, rec := range recs[1:] {
		p0, _ := strconv.ParseFloat(rec[1], 64)
		p1, _ := strconv.ParseFloat(rec[2], 64)
		// p_no = 1 − p_yes, rounded once: 1e-15 is a few units of 2⁻⁵².
		if math.Abs(p0+p1-1) > 1e-15 || (rec[0] == "yes") != (p1 > p0) {
			t.Errorf("binary row %v", rec)
		}
	}
}
