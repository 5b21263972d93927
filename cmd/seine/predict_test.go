package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/seine-ml/seine/nn"
)

func TestPredict(t *testing.T) {
	r := seine(t, "predict", "-model", baseModel, "-data", triageData, "-probabilities")
	if r.code != 0 {
		t.Fatalf("status %d; stderr %q", r.code, r.stderr)
	}
	recs, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"class", "p_human", "p_crawler", "p_scraper", "p_stuffer", "p_monitor"}
	if strings.Join(recs[0], ",") != strings.Join(want, ",") {
		t.Errorf("header %v, want %v", recs[0], want)
	}
	if len(recs)-1 != triageRows {
		t.Fatalf("%d rows, want %d", len(recs)-1, triageRows)
	}
	m, err := nn.Load(baseModel)
	if err != nil {
		t.Fatal(err)
	}
	for i, rec := range recs[1:] {
		sum, best := 0.0, 1
		for j := 1; j < len(rec); j++ {
			p, err := strconv.ParseFloat(rec[j], 64)
			if err != nil || p < 0 || p > 1 {
				t.Fatalf("row %d: probability %q", i+1, rec[j])
			}
			sum += p
			if v, _ := strconv.ParseFloat(rec[best], 64); p > v {
				best = j
			}
		}
		// Softmax outputs are normalised in float64: the sum of 5 terms is 1
		// up to a few units of rounding, 5·2⁻⁵² ≈ 1e-15; 1e-12 is generous.
		if math.Abs(sum-1) > 1e-12 {
			t.Errorf("row %d: probabilities sum to %.17g", i+1, sum)
		}
		if rec[0] != want[best][2:] {
			t.Errorf("row %d: class %q but the largest probability is %s", i+1, rec[0], want[best])
		}
		if i == 0 && rec[0] != m.Classes[0] {
			// The first row of sessions.csv is a human session that every
			// model trained here gets right (probability 0.99 at 100 iterations).
			t.Errorf("row 1: %q, want human", rec[0])
		}
	}
}

// TestPredictNoLabel reads a file without the label column and writes to
// -out; the output matches the prediction of the labelled file.
func TestPredictNoLabel(t *testing.T) {
	dir := t.TempDir()
	b, err := os.ReadFile("testdata/unknown_label.csv")
	if err != nil {
		t.Fatal(err)
	}
	var nolabel bytes.Buffer
	for _, line := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		nolabel.WriteString(line[:strings.LastIndexByte(line, ',')] + "\n")
	}
	in := filepath.Join(dir, "in.csv")
	os.WriteFile(in, nolabel.Bytes(), 0o644)
	out := filepath.Join(dir, "out.csv")
	r := seine(t, "predict", "-model", baseModel, "-data", in, "-out", out)
	if r.code != 0 {
		t.Fatalf("status %d; stderr %q", r.code, r.stderr)
	}
	got, _ := os.ReadFile(out)
	if lines := strings.Split(strings.TrimSpace(string(got)), "\n"); len(lines) != 4 || lines[0] != "class" {
		t.Errorf("output %q: want a header and 3 rows", got)
	}
	// The labelled file gives the same classes: its label column is not
	// among the model's features, whatever its values.
	r2 := seine(t, "predict", "-model", baseModel, "-data", "testdata/unknown_label.csv")
	if r2.code != 0 || r2.stdout != string(got) {
		t.Errorf("labelled input: status %d, %q; want %q", r2.code, r2.stdout, got)
	}
	// Bad input: one line, and the old output is kept.
	r = seine(t, "predict", "-model", baseModel, "-data", "testdata/nan.csv", "-out", out)
	if r.code != 1 {
		t.Fatalf("status %d; stderr %q", r.code, r.stderr)
	}
	oneLineError(t, r.stderr, "nan.csv: line 4 (row 3)", "error_share")
	if after, _ := os.ReadFile(out); !bytes.Equal(after, got) {
		t.Errorf("-out changed on failure")
	}
}

func TestGradientCheck(t *testing.T) {
	for _, args := range [][]string{
		{"gradient-check", "-spec", triageSpec, "-json"},
		{"gradient-check", "-spec", triageSpec, "-data", triageData, "-rows", "30", "-json"},
	} {
		r := seine(t, args...)
		if r.code != 0 {
			t.Fatalf("%v: status %d; stderr %q", args, r.code, r.stderr)
		}
		var g gradReport
		if err := json.Unmarshal([]byte(r.stdout), &g); err != nil {
			t.Fatal(err)
		}
		// optim.CheckGradient's doc: a correct gradient gives about 1e-7 or
		// less with central differences; we measured about 1e-10 here.
		if !(g.MaxRelErr < 1e-6) || !g.Passed || g.Params != 533 {
			t.Errorf("%v: %+v", args, g)
		}
		if layer, name := paramName(mustNet(t), g.Param); layer != g.Layer || name != g.Name {
			t.Errorf("param %d named %q in layer %d, want %q in %d", g.Param, g.Name, g.Layer, name, layer)
		}
	}
	r := seine(t, "gradient-check", "-spec", triageSpec)
	if r.code != 0 || !strings.Contains(r.stdout, "largest relative error") || !strings.Contains(r.stdout, "passed") {
		t.Errorf("text: status %d, %q", r.code, r.stdout)
	}
}

func mustNet(t *testing.T) *nn.Net {
	t.Helper()
	s, err := loadSpec(triageSpec)
	if err != nil {
		t.Fatal(err)
	}
	n, err := nn.Compile(s)
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// TestParamName checks names against the layout of nn's package doc: block
// l is W_l (n_{l+1} × n_l, row-major) then b_l. For 16 → 24 → 5, W_0 holds
// params 0…383, b_0 384…407, W_1 408…527, b_1 528…532.
func TestParamName(t *testing.T) {
	n := mustNet(t)
	for _, tt := range []struct {
		i     int
		layer int
		name  string
	}{
		{0, 1, "layer 1 weight [0,0]"},
		{17, 1, "layer 1 weight [1,1]"},
		{383, 1, "layer 1 weight [23,15]"},
		{384, 1, "layer 1 bias [0]"},
		{407, 1, "layer 1 bias [23]"},
		{408 + 3*24 + 7, 2, "layer 2 weight [3,7]"},
		{532, 2, "layer 2 bias [4]"},
	} {
		if l, name := paramName(n, tt.i); l != tt.layer || name != tt.name {
			t.Errorf("param %d: %d %q, want %d %q", tt.i, l, name, tt.layer, tt.name)
		}
	}
}

// TestGradientReportFails checks the failing verdict, which a correct
// backpropagation never produces on the demo spec.
func TestGradientReportFails(t *testing.T) {
	s, _ := loadSpec(triageSpec)
	r := gradReport{MaxRelErr: 3e-3, Name: "layer 2 bias [1]", Tolerance: gradTolerance}
	var out bytes.Buffer
	err := r.write(&out, false, s)
	if err == nil || !strings.Contains(err.Error(), "relative error 0.003 at layer 2 bias [1] exceeds 1e-06") {
		t.Errorf("error %v", err)
	}
	if !strings.Contains(out.String(), "FAILED") {
		t.Errorf("report %q", out.String())
	}
}

func TestInspect(t *testing.T) {
	r := seine(t, "inspect", "-spec", triageSpec)
	if r.code != 0 {
		t.Fatalf("status %d; stderr %q", r.code, r.stderr)
	}
	// 16·24+24+24·5+5 = 533 params (spec.ParamCount); FLOPs from nn's
	// documented formula: predict Σ(2·n_l·n_{l+1} + 2·n_{l+1}) = 816+240 +
	// 10 = 1,066.
	for _, w := range []string{"all", "533", "1 ", "16 → 24", "tanh", "24 → 5", "softmax", "1,066 to predict", "training on 10000 rows"} {
		if !strings.Contains(r.stdout, w) {
			t.Errorf("inspect lacks %q:\n%s", w, r.stdout)
		}
	}
	s, _ := loadSpec(triageSpec)
	if !strings.Contains(r.stdout, "params          "+strconv.Itoa(s.ParamCount())+" float64") {
		t.Errorf("param count: want %d:\n%s", s.ParamCount(), r.stdout)
	}
	r = seine(t, "inspect", "-model", baseModel)
	if r.code != 0 || !strings.Contains(r.stdout, "training on 2250 rows") || !strings.Contains(r.stdout, "holdout rows    750") {
		t.Errorf("model: status %d:\n%s%s", r.code, r.stdout, r.stderr)
	}
	if r := runIn("inspect", "-spec", triageSpec, "-model", baseModel); r.code != 2 {
		t.Errorf("both -spec and -model: status %d", r.code)
	}
}

func TestBytesAndCounts(t *testing.T) {
	for _, tt := range []struct {
		b    int64
		want string
	}{{0, "0 B"}, {1023, "1023 B"}, {1024, "1.0 KiB"}, {4264, "4.2 KiB"}, {3 << 20, "3.0 MiB"}} {
		if got := bytesText(tt.b); got != tt.want {
			t.Errorf("bytesText(%d) = %q, want %q", tt.b, got, tt.want)
		}
	}
	for _, tt := range []struct {
		v    float64
		want string
	}{{7, "7"}, {999, "999"}, {1066, "1,066"}, {1234567, "1,234,567"}} {
		if got := countText(tt.v); got != tt.want {
			t.Errorf("countText(%g) = %q, want %q", tt.v, got, tt.want)
		}
	}
}

// TestCheckpointResume writes checkpoints during a run and resumes from
// one: the resumed run starts at the checkpoint's cost, not the initial one.
func TestCheckpointResume(t *testing.T) {
	dir := t.TempDir()
	ck := filepath.Join(dir, "ck.seine.json")
	out := filepath.Join(dir, "m.seine.json")
	r := seine(t, "train", "-spec", triageSpec, "-data", triageData, "-out", out, "-iterations", "20",
		"-checkpoint", ck, "-every", "10", "-quiet")
	if r.code != 0 {
		t.Fatalf("status %d; stderr %q", r.code, r.stderr)
	}
	c, err := nn.Load(ck)
	if err != nil {
		t.Fatal(err)
	}
	if c.Summary.Iterations != 20 || c.Summary.Status != "Checkpoint" {
		t.Errorf("checkpoint summary %+v", c.Summary)
	}
	r = seine(t, "train", "-spec", triageSpec, "-data", triageData, "-out", out, "-iterations", "1", "-resume", ck)
	if r.code != 0 {
		t.Fatalf("resume: status %d; stderr %q", r.code, r.stderr)
	}
	// L-BFGS never raises the cost, so after one more iteration the cost is
	// at most the checkpoint's (which is well below the start, ~1.6).
	m, _ := nn.Load(out)
	if !(m.Summary.Cost <= c.Summary.Cost) {
		t.Errorf("resumed cost %g above the checkpoint's %g", m.Summary.Cost, c.Summary.Cost)
	}
	before, _ := os.ReadFile(out)
	r = seine(t, "train", "-spec", "testdata/triage_small.yaml", "-data", triageData, "-out", out, "-resume", ck)
	if r.code != 1 {
		t.Fatalf("mismatched resume: status %d; stderr %q", r.code, r.stderr)
	}
	oneLineError(t, r.stderr, "-resume "+ck, "16 → 24 tanh → 5 softmax", "16 → 8 tanh → 5 softmax")
	if after, _ := os.ReadFile(out); !bytes.Equal(before, after) {
		t.Errorf("-out changed on failure")
	}
}
