package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
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
	require.Equal(t, 0, r.code, "stderr %q", r.stderr)
	recs, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	require.NoError(t, err)
	want := []string{"class", "p_human", "p_crawler", "p_scraper", "p_stuffer", "p_monitor"}
	assert.Equal(t, strings.Join(want, ","), strings.Join(recs[0], ","), "header")
	require.Equal(t, triageRows, len(recs)-1, "rows")
	m, err := nn.Load(baseModel)
	require.NoError(t, err)
	for i, rec := range recs[1:] {
		sum, best := 0.0, 1
		for j := 1; j < len(rec); j++ {
			p, err := strconv.ParseFloat(rec[j], 64)
			require.NoError(t, err, "row %d: probability %q", i+1, rec[j])
			require.GreaterOrEqual(t, p, 0.0, "row %d: probability %q", i+1, rec[j])
			require.LessOrEqual(t, p, 1.0, "row %d: probability %q", i+1, rec[j])
			sum += p
			if v, _ := strconv.ParseFloat(rec[best], 64); p > v {
				best = j
			}
		}
		// Softmax outputs are normalised in float64 and -digits 0 writes
		// each probability exactly: the sum of 5 terms is 1 up to a few
		// units of rounding, 5·2⁻⁵² ≈ 1.1e-15, so 1e-14 leaves a margin.
		assert.InDelta(t, 1, sum, 1e-14, "row %d: probabilities sum to %.17g", i+1, sum)
		assert.Equal(t, want[best][2:], rec[0], "row %d: class, against the largest probability %s", i+1, want[best])
		if i == 0 {
			// The first row of sessions.csv is a human session that every
			// model trained here gets right (probability 0.99 at 100 iterations).
			assert.Equal(t, m.Classes()[0], rec[0], "row 1, want human")
		}
	}
}

// TestPredictNoLabel reads a file without the label column and writes to
// -out; the output matches the prediction of the labelled file.
func TestPredictNoLabel(t *testing.T) {
	dir := t.TempDir()
	b, err := os.ReadFile("testdata/unknown_label.csv")
	require.NoError(t, err)
	var nolabel bytes.Buffer
	for _, line := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		nolabel.WriteString(line[:strings.LastIndexByte(line, ',')] + "\n")
	}
	in := filepath.Join(dir, "in.csv")
	os.WriteFile(in, nolabel.Bytes(), 0o644)
	out := filepath.Join(dir, "out.csv")
	r := seine(t, "predict", "-model", baseModel, "-data", in, "-out", out)
	require.Equal(t, 0, r.code, "stderr %q", r.stderr)
	got, _ := os.ReadFile(out)
	lines := strings.Split(strings.TrimSpace(string(got)), "\n")
	assert.Len(t, lines, 4, "output %q: want a header and 3 rows", got)
	assert.Equal(t, "class", lines[0], "header of %q", got)
	// The labelled file gives the same classes: its label column is not
	// among the model's features, whatever its values.
	r2 := seine(t, "predict", "-model", baseModel, "-data", "testdata/unknown_label.csv")
	assert.Equal(t, 0, r2.code, "labelled input: status; stderr %q", r2.stderr)
	assert.Equal(t, string(got), r2.stdout, "labelled input")
	// Bad input: one line, and the old output is kept.
	r = seine(t, "predict", "-model", baseModel, "-data", "testdata/nan.csv", "-out", out)
	require.Equal(t, 1, r.code, "stderr %q", r.stderr)
	oneLineError(t, r.stderr, "nan.csv: line 4 (row 3)", "error_share")
	after, _ := os.ReadFile(out)
	assert.Equal(t, string(got), string(after), "-out changed on failure")
}

func TestGradientCheck(t *testing.T) {
	for _, tt := range []struct {
		name string
		args []string
	}{
		{"without data", []string{"gradient-check", "-spec", triageSpec, "-json"}},
		{"with data", []string{"gradient-check", "-spec", triageSpec, "-data", triageData, "-rows", "30", "-json"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			args := tt.args
			r := seine(t, args...)
			require.Equal(t, 0, r.code, "%v: stderr %q", args, r.stderr)
			var g gradReport
			require.NoError(t, json.Unmarshal([]byte(r.stdout), &g))
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
			assert.Less(t, g.MaxRelErr, 1e-6, "%v: %+v", args, g)
			assert.True(t, g.Passed, "%v: %+v", args, g)
			assert.Equal(t, want, g.Params, "%v: params", args)
			if len(args) > 4 {
				return // paramName's check below needs the placeholder net
			}
			layer, name := paramName(mustNet(t), g.Param)
			assert.Equal(t, layer, g.Layer, "layer of param %d", g.Param)
			assert.Equal(t, name, g.Name, "name of param %d", g.Param)
		})
	}
	r := seine(t, "gradient-check", "-spec", triageSpec)
	assert.Equal(t, 0, r.code, "text: status; stderr %q", r.stderr)
	assert.Contains(t, r.stdout, "largest relative error", "text")
	assert.Contains(t, r.stdout, "passed", "text")
}

func mustNet(t *testing.T) *nn.Net {
	t.Helper()
	s, err := loadSpec(context.Background(), triageSpec)
	require.NoError(t, err)
	n, err := nn.Compile(encode.Placeholder(s))
	require.NoError(t, err)
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
		t.Run(tt.name, func(t *testing.T) {
			l, name := paramName(n, tt.i)
			assert.Equal(t, tt.layer, l, "layer of param %d", tt.i)
			assert.Equal(t, tt.name, name, "name of param %d", tt.i)
		})
	}
}

// TestGradientReportFails checks the failing verdict, which a correct
// backpropagation never produces on the demo spec.
func TestGradientReportFails(t *testing.T) {
	s, _ := loadSpec(context.Background(), triageSpec)
	r := gradReport{MaxRelErr: 3e-3, Name: "layer 2 bias [1]", Tolerance: gradTolerance}
	var out bytes.Buffer
	err := r.write(&out, false, s)
	assert.ErrorContains(t, err, "relative error 0.003 at layer 2 bias [1] exceeds 1e-06")
	assert.Contains(t, out.String(), "FAILED", "report")
}

func TestInspect(t *testing.T) {
	r := seine(t, "inspect", "-spec", triageSpec)
	require.Equal(t, 0, r.code, "stderr %q", r.stderr)
	// agent_family's levels are learned from data, so inspect counts two
	// stand-in levels and the missing unit: 19 input units, 19·24+24+24·5+5
	// = 605 params; FLOPs from nn's documented formula: predict
	// Σ(2·n_l·n_{l+1} + 2·n_{l+1}) = 912+48 + 240+10 = 1,210.
	for _, w := range []string{"all", "605", "1 ", "19 → 24", "tanh", "24 → 5", "softmax", "1,210 to predict", "training on 10000 rows", "agent_family  category, levels learned"} {
		assert.Contains(t, r.stdout, w, "inspect lacks %q", w)
	}
	s, _ := loadSpec(context.Background(), triageSpec)
	n := encode.Placeholder(s).ParamCount()
	assert.Contains(t, r.stdout, "params          "+strconv.Itoa(n)+" float64", "param count: want %d", n)
	r = seine(t, "inspect", "-model", baseModel)
	assert.Equal(t, 0, r.code, "model: status; stderr %s", r.stderr)
	assert.Contains(t, r.stdout, "training on 2250 rows", "model")
	assert.Contains(t, r.stdout, "holdout rows    750", "model")
	assert.Equal(t, 2, runIn("inspect", "-spec", triageSpec, "-model", baseModel).code, "both -spec and -model: status")
}

func TestBytesAndCounts(t *testing.T) {
	for _, tt := range []struct {
		b    int64
		want string
	}{{0, "0 B"}, {1023, "1023 B"}, {1024, "1.0 KiB"}, {4264, "4.2 KiB"}, {3 << 20, "3.0 MiB"}} {
		t.Run("bytesText "+tt.want, func(t *testing.T) {
			assert.Equal(t, tt.want, bytesText(tt.b), "bytesText(%d)", tt.b)
		})
	}
	for _, tt := range []struct {
		v    float64
		want string
	}{{7, "7"}, {999, "999"}, {1066, "1,066"}, {1234567, "1,234,567"}} {
		t.Run("countText "+tt.want, func(t *testing.T) {
			assert.Equal(t, tt.want, countText(tt.v), "countText(%g)", tt.v)
		})
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
	require.Equal(t, 0, r.code, "stderr %q", r.stderr)
	c, err := nn.Load(ck)
	require.NoError(t, err)
	assert.Equal(t, 20, c.Summary().Iterations, "checkpoint summary %+v", c.Summary())
	assert.Equal(t, optim.Running, c.Summary().Status, "checkpoint summary %+v", c.Summary())
	r = seine(t, "train", "-spec", triageSpec, "-data", triageData, "-out", out, "-iterations", "1", "-resume", ck)
	require.Equal(t, 0, r.code, "resume: stderr %q", r.stderr)
	// L-BFGS never raises the cost, so after one more iteration the cost is
	// at most the checkpoint's (which is well below the start, ~1.6).
	m, _ := nn.Load(out)
	assert.LessOrEqual(t, m.Summary().Cost, c.Summary().Cost, "resumed cost above the checkpoint's")
	before, _ := os.ReadFile(out)
	r = seine(t, "train", "-spec", "testdata/triage_small.yaml", "-data", triageData, "-out", out, "-resume", ck)
	require.Equal(t, 1, r.code, "mismatched resume: stderr %q", r.stderr)
	oneLineError(t, r.stderr, "-resume "+ck, "21 → 24 tanh → 5 softmax", "21 → 8 tanh → 5 softmax")
	// Not assert.Equal: a diff of two model files is no help.
	after, _ := os.ReadFile(out)
	assert.True(t, bytes.Equal(before, after), "-out changed on failure")
}
