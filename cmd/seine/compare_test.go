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
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, format, err := image.DecodeConfig(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if format != "png" || cfg.Width != w || cfg.Height != h {
		t.Errorf("%s: %s %d×%d, want png %d×%d", path, format, cfg.Width, cfg.Height, w, h)
	}
}

// checkSVG checks that path is an SVG document of the narrow size.
func checkSVG(t *testing.T, path string) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	if !strings.Contains(s, "<svg") || !strings.Contains(s, svgNarrow) || !strings.HasSuffix(strings.TrimSpace(s), "</svg>") {
		t.Errorf("%s: not a complete SVG of %s: %.200s", path, svgNarrow, s)
	}
}

func TestCompareCommand(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "cost.png")
	trace := filepath.Join(dir, "trace.csv")
	r := runIn("compare", "-spec", triageSpec, "-data", triageData, "-optimizers", "lbfgs, adam",
		"-iterations", "4", "-seeds", "2", "-holdout", "0.2", "-json", "-plot", plot, "-trace", trace)
	if r.code != 0 {
		t.Fatalf("status %d: %s", r.code, r.stderr)
	}
	var rows []map[string]any
	if err := json.Unmarshal([]byte(r.stdout), &rows); err != nil {
		t.Fatalf("JSON: %v\n%s", err, r.stdout)
	}
	if len(rows) != 2 || rows[0]["optimizer"] != "lbfgs" || rows[1]["optimizer"] != "adam" {
		t.Fatalf("rows = %v", rows)
	}
	for _, k := range []string{"optimizer", "final_cost", "evaluations", "iterations", "seconds", "holdout_accuracy", "status", "evaluations_to_target", "reached"} {
		if _, ok := rows[0][k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	// 4 epochs of Adam over all training rows count 4 evaluations
	// (optim's accounting, b/m per batch).
	if ev := rows[1]["evaluations"].(float64); ev < 4-1e-9 || ev > 4+1e-9 {
		t.Errorf("adam evaluations %g, want 4", ev)
	}
	checkPNG(t, plot, pngWide, pngHeight)

	f, err := os.Open(trace)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	want := "method,seed,iteration,evaluations,seconds,cost,grad_norm,holdout_accuracy"
	if got := strings.Join(recs[0], ","); got != want {
		t.Errorf("trace header %q, want %q", got, want)
	}
	// 2 methods × 2 seeds × 4 iterations (neither converges in 4).
	if len(recs) != 1+16 {
		t.Errorf("trace has %d records, want 17", len(recs))
	}
}

func TestCompareTableAndProfiles(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "profile.svg")
	problems := filepath.Join(dir, "problems.txt")
	abs := func(p string) string { a, _ := filepath.Abs(p); return a }
	text := "# two problems\n" + abs(triageSpec) + " " + abs(triageData) + "\n\n" + abs(triageSpec) + "  " + abs(triageData) + "\n"
	if err := os.WriteFile(problems, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	r := runIn("compare", "-problems", problems, "-optimizers", "gd,lbfgs", "-iterations", "3", "-plot", plot)
	if r.code != 0 {
		t.Fatalf("status %d: %s", r.code, r.stderr)
	}
	for _, w := range []string{"evals→target", "a mini-batch of b rows", "ρ(1)", "Dolan & Moré 2002", "lbfgs"} {
		if !strings.Contains(r.stdout, w) {
			t.Errorf("table lacks %q:\n%s", w, r.stdout)
		}
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
			if r.code != tt.code {
				t.Fatalf("status %d, want %d; stderr %q", r.code, tt.code, r.stderr)
			}
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
