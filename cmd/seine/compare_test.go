package main

import (
	"encoding/csv"
	"encoding/json"
	"image"
	_ "image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Image sizes of internal/chart: Width 16 cm (28 cm for the two-panel cost
// chart) × Height 10 cm at 150 dots per inch; 1 in = 2.54 cm (common
// practice), so 16 cm → 944.9 px, 28 cm → 1653.5 px, 10 cm → 590.6 px,
// rounded up by the PNG renderer to 945, 1654 and 591. In SVG the sizes
// are in points, 72 to the inch: 16 cm → 453.54 pt, 10 cm → 283.46 pt.
const (
	pngWide, pngNarrow, pngHeight = 1654, 945, 591
	svgNarrow                     = `width="453.54pt" height="283.46pt"`
)

// checkPNG decodes the PNG header at path and checks its size.
func checkPNG(t *testing.T, path string, w, h int) {
	t.Helper()
	f, err := os.Open(path)
	require.NoError(t, err)
	defer f.Close()
	cfg, format, err := image.DecodeConfig(f)
	require.NoError(t, err, path)
	assert.Equal(t, []any{"png", w, h}, []any{format, cfg.Width, cfg.Height}, "%s: format, width, height", path)
}

// checkSVG checks that path is an SVG document of the narrow size.
func checkSVG(t *testing.T, path string) {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	s := string(b)
	assert.True(t, strings.Contains(s, "<svg"), "%s: no <svg> element: %.200s", path, s)
	assert.True(t, strings.Contains(s, svgNarrow), "%s: not an SVG of %s: %.200s", path, svgNarrow, s)
	assert.True(t, strings.HasSuffix(strings.TrimSpace(s), "</svg>"), "%s: not a complete SVG, no </svg> at the end: %.200s", path, s)
}

func TestCompareCommand(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "cost.png")
	trace := filepath.Join(dir, "trace.csv")
	r := runIn("compare", "-spec", triageSpec, "-data", triageData, "-optimizers", "lbfgs, adam",
		"-iterations", "4", "-seeds", "2", "-holdout", "0.2", "-json", "-plot", plot, "-trace", trace)
	require.Equal(t, 0, r.code, r.stderr)
	var rows []map[string]any
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &rows), "JSON:\n%s", r.stdout)
	require.Len(t, rows, 2, "rows = %v", rows)
	require.Equal(t, "lbfgs", rows[0]["optimizer"], "rows = %v", rows)
	require.Equal(t, "adam", rows[1]["optimizer"], "rows = %v", rows)
	for _, k := range []string{"optimizer", "final_cost", "evaluations", "iterations", "seconds", "holdout_accuracy", "status", "evaluations_to_target", "reached"} {
		assert.Contains(t, rows[0], k, "JSON lacks %q", k)
	}
	// 4 epochs of Adam over all training rows count 4 evaluations
	// (optim's accounting, b/m per batch).
	assert.InDelta(t, 4, rows[1]["evaluations"], 1e-9, "adam evaluations")
	checkPNG(t, plot, pngWide, pngHeight)

	f, err := os.Open(trace)
	require.NoError(t, err)
	recs, err := csv.NewReader(f).ReadAll()
	f.Close()
	require.NoError(t, err)
	want := "method,seed,iteration,evaluations,seconds,cost,grad_norm,holdout_accuracy"
	assert.Equal(t, want, strings.Join(recs[0], ","), "trace header")
	// 2 methods × 2 seeds × 4 iterations (neither converges in 4).
	assert.Equal(t, 1+16, len(recs), "trace records")
}

func TestCompareTableAndProfiles(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "profile.svg")
	problems := filepath.Join(dir, "problems.txt")
	abs := func(p string) string { a, _ := filepath.Abs(p); return a }
	text := "# two problems\n" + abs(triageSpec) + " " + abs(triageData) + "\n\n" + abs(triageSpec) + "  " + abs(triageData) + "\n"
	require.NoError(t, os.WriteFile(problems, []byte(text), 0o644))
	r := runIn("compare", "-problems", problems, "-optimizers", "gd,lbfgs", "-iterations", "3", "-plot", plot)
	require.Equal(t, 0, r.code, r.stderr)
	for _, w := range []string{"evals→target", "a mini-batch of b rows", "ρ(1)", "Dolan & Moré 2002", "lbfgs"} {
		assert.Contains(t, r.stdout, w, "table lacks %q", w)
	}
	checkSVG(t, plot)
	checkSVG(t, filepath.Join(dir, "profile-time.svg"))
}

func TestCompareUsage(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.txt")
	os.WriteFile(bad, []byte("only-one-path\n"), 0o644)
	tests := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"no spec", []string{"-data", "d"}, 2, "-spec is required"},
		{"unpaired", []string{"-spec", "a", "-spec", "b", "-data", "d"}, 2, "in pairs"},
		{"bad optimizer", []string{"-spec", "a", "-data", "d", "-optimizers", "gd,newton"}, 2, `item 2 is "newton"`},
		{"twice", []string{"-spec", "a", "-data", "d", "-optimizers", "gd,gd"}, 2, "listed twice"},
		{"seeds", []string{"-spec", "a", "-data", "d", "-seeds", "0"}, 2, "-seeds 0"},
		{"target", []string{"-spec", "a", "-data", "d", "-target", "-1"}, 2, "-target -1"},
		{"plot format", []string{"-spec", "a", "-data", "d", "-plot", "x.jpg"}, 2, ".png or .svg"},
		{"problems and spec", []string{"-problems", bad, "-spec", "a"}, 2, "not both"},
		{"bad problems line", []string{"-problems", bad}, 1, "bad.txt:1: 1 fields"},
		{"missing spec file", []string{"-spec", filepath.Join(dir, "none.yaml"), "-data", triageData}, 1, "none.yaml"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(append([]string{"compare"}, tt.args...)...)
			require.Equal(t, tt.code, r.code, "status; stderr %q", r.stderr)
			oneLineError(t, r.stderr, tt.want)
		})
	}
}

// TestCompareProgress: a plain line per finished run naming the method and
// seed, and the problem when there are several; none with -quiet.
func TestCompareProgress(t *testing.T) {
	r := seine(t, "compare", "-spec", binarySpec, "-data", binaryData, "-spec", tagsSpec, "-data", tagsData,
		"-optimizers", "gd,lbfgs", "-seeds", "2", "-seed", "5", "-iterations", "2")
	require.Equal(t, 0, r.code, r.stderr)
	assert.Contains(t, r.stderr, "compare: fit 1/4 (problem 1/2: gd, seed 5) done: ")
	assert.Contains(t, r.stderr, "compare: fit 4/4 (problem 2/2: lbfgs, seed 6) done: ")
	r = seine(t, "compare", "-spec", binarySpec, "-data", binaryData, "-optimizers", "gd", "-iterations", "2", "-quiet")
	require.Equal(t, 0, r.code, r.stderr)
	assert.NotContains(t, r.stderr, "fit 1/1")
}
