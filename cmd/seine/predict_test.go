package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
)

// TestPredictDigits: by default probabilities have 6 significant digits
// (so a row's sum is 1 within 5 halves of 1e-6), and -digits 0 round-trips.
func TestPredictDigits(t *testing.T) {
	r := seine(t, "predict", "-model", baseModel, "-data", triageData, "-probabilities")
	require.Equal(t, 0, r.code, r.stderr)
	recs, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	require.NoError(t, err)
	for _, rec := range recs[1:20] {
		sum := 0.0
		for _, c := range rec[1:] {
			require.LessOrEqual(t, len(strings.TrimLeft(strings.Split(strings.Replace(c, ".", "", 1), "e")[0], "0")), 6, c)
			p, err := strconv.ParseFloat(c, 64)
			require.NoError(t, err)
			sum += p
		}
		assert.InDelta(t, 1, sum, 2.5e-6)
	}
	assert.Equal(t, 2, seine(t, "predict", "-model", baseModel, "-data", triageData, "-digits", "18").code)
}

func TestPredict(t *testing.T) {
	r := seine(t, "predict", "-model", baseModel, "-data", triageData, "-probabilities", "-digits", "0")
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
		// Softmax outputs are normalised in float64 and -digits 0 writes
		// each probability exactly: the sum of 5 terms is 1 up to a few
		// units of rounding, 5·2⁻⁵² ≈ 1.1e-15, so 1e-14 leaves a margin.
		if math.Abs(sum-1) > 1e-14 {
			t.Errorf("row %d: probabilities sum to %.17g", i+1, sum)
		}
		if rec[0] != want[best][2:] {
			t.Errorf("row %d: class %q but the largest probability is %s", i+1, rec[0], want[best])
		}
		if i == 0 && rec[0] != m.Classes()[0] {
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
		// Without data, agent_family's levels are not known and count as
		// two (plus its missing unit): 19 input units, (19+1)·24 + 25·5 =
		// 605 params. With data, the encoder learns the levels of the 30
		// rows: all four families, 21 units, 22·24 + 125 = 653 params.
		want := 605
		if len(args) > 4 {
			want = 653
		}
		if !(g.MaxRelErr < 1e-6) || !g.Passed || g.Params != want {
			t.Errorf("%v: %+v, want %d params", args, g, want)
		}
		if len(args) > 4 {
			continue // paramName's check below needs the placeholder net
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
	s, err := loadSpec(context.Background(), triageSpec)
	if err != nil {
		t.Fatal(err)
	}
	n, err := nn.Compile(encode.Placeholder(s))
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// TestParamName checks names against the layout of nn's package doc: block
// l is W_l (n_{l+1} × n_l, row-major) then b_l. For 19 → 24 → 5 (the triage
// spec with two stand-in levels and a missing unit for agent_family), W_0
// holds params 0…455, b_0 456…479, W_1 480…599, b_1 600…604.
func TestParamName(t *testing.T) {
	n := mustNet(t)
	for _, tt := range []struct {
		i     int
		layer int
		name  string
	}{
		{0, 1, "layer 1 weight [0,0]"},
		{20, 1, "layer 1 weight [1,1]"},
		{455, 1, "layer 1 weight [23,18]"},
		{456, 1, "layer 1 bias [0]"},
		{479, 1, "layer 1 bias [23]"},
		{480 + 3*24 + 7, 2, "layer 2 weight [3,7]"},
		{604, 2, "layer 2 bias [4]"},
	} {
		if l, name := paramName(n, tt.i); l != tt.layer || name != tt.name {
			t.Errorf("param %d: %d %q, want %d %q", tt.i, l, name, tt.layer, tt.name)
		}
	}
}

// TestGradientReportFails checks the failing verdict, which a correct
// backpropagation never produces on the demo spec.
func TestGradientReportFails(t *testing.T) {
	s, _ := loadSpec(context.Background(), triageSpec)
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
	// agent_family's levels are learned from data, so inspect counts two
	// stand-in levels and the missing unit: 19 input units, 19·24+24+24·5+5
	// = 605 params; FLOPs from nn's documented formula: predict
	// Σ(2·n_l·n_{l+1} + 2·n_{l+1}) = 912+48 + 240+10 = 1,210.
	for _, w := range []string{"all", "605", "1 ", "19 → 24", "tanh", "24 → 5", "softmax", "1,210 to predict", "training on 10000 rows", "agent_family  category, levels learned"} {
		if !strings.Contains(r.stdout, w) {
			t.Errorf("inspect lacks %q:\n%s", w, r.stdout)
		}
	}
	s, _ := loadSpec(context.Background(), triageSpec)
	if n := encode.Placeholder(s).ParamCount(); !strings.Contains(r.stdout, "params          "+strconv.Itoa(n)+" float64") {
		t.Errorf("param count: want %d:\n%s", n, r.stdout)
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
	if c.Summary().Iterations != 20 || c.Summary().Status != optim.Running {
		t.Errorf("checkpoint summary %+v", c.Summary())
	}
	r = seine(t, "train", "-spec", triageSpec, "-data", triageData, "-out", out, "-iterations", "1", "-resume", ck)
	if r.code != 0 {
		t.Fatalf("resume: status %d; stderr %q", r.code, r.stderr)
	}
	// L-BFGS never raises the cost, so after one more iteration the cost is
	// at most the checkpoint's (which is well below the start, ~1.6).
	m, _ := nn.Load(out)
	if !(m.Summary().Cost <= c.Summary().Cost) {
		t.Errorf("resumed cost %g above the checkpoint's %g", m.Summary().Cost, c.Summary().Cost)
	}
	before, _ := os.ReadFile(out)
	r = seine(t, "train", "-spec", "testdata/triage_small.yaml", "-data", triageData, "-out", out, "-resume", ck)
	if r.code != 1 {
		t.Fatalf("mismatched resume: status %d; stderr %q", r.code, r.stderr)
	}
	oneLineError(t, r.stderr, "-resume "+ck, "21 → 24 tanh → 5 softmax", "21 → 8 tanh → 5 softmax")
	if after, _ := os.ReadFile(out); !bytes.Equal(before, after) {
		t.Errorf("-out changed on failure")
	}
}
