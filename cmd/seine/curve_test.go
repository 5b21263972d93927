package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestCurveCommand(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "curve.svg")
	r := runIn("curve", "-spec", triageSpec, "-data", triageData, "-steps", "2", "-iterations", "5", "-json", "-plot", plot)
	if r.code != 0 {
		t.Fatalf("status %d: %s", r.code, r.stderr)
	}
	var c map[string]any
	if err := json.Unmarshal([]byte(r.stdout), &c); err != nil {
		t.Fatalf("JSON: %v\n%s", err, r.stdout)
	}
	for _, k := range []string{"holdout_rows", "baseline", "shape", "hint", "points"} {
		if _, ok := c[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	pts := c["points"].([]any)
	// 3000 rows, default holdout 0.25: 2250 training rows, sizes 1125 and
	// 2250.
	if len(pts) != 2 || pts[1].(map[string]any)["rows"].(float64) != 2250 {
		t.Errorf("points = %v", pts)
	}
	checkSVG(t, plot)

	r = runIn("curve", "-spec", triageSpec, "-data", triageData, "-steps", "1", "-iterations", "2")
	if r.code != 0 || !strings.Contains(r.stdout, "Hint, not a verdict:") || !strings.Contains(r.stdout, "holdout cost") {
		t.Errorf("text report: status %d\n%s%s", r.code, r.stdout, r.stderr)
	}
}

func TestCurveUsage(t *testing.T) {
	tests := []struct {
		args []string
		want string
	}{
		{[]string{"-data", "d"}, "-spec is required"},
		{[]string{"-spec", "s", "-data", "d", "-steps", "0"}, "-steps 0"},
		{[]string{"-spec", "s", "-data", "d", "-holdout", "1"}, "-holdout 1"},
		{[]string{"-spec", "s", "-data", "d", "-plot", "c.gif"}, ".png or .svg"},
	}
	for _, tt := range tests {
		r := runIn(append([]string{"curve"}, tt.args...)...)
		if r.code != 2 {
			t.Errorf("%v: status %d, want 2", tt.args, r.code)
			continue
		}
		oneLineError(t, r.stderr, tt.want)
	}
}

// TestCurveProgress: a plain line per finished fit naming its rows on
// standard error (a pipe here); none with -quiet.
func TestCurveProgress(t *testing.T) {
	r := seine(t, "curve", "-spec", binarySpec, "-data", binaryData, "-steps", "2", "-iterations", "2")
	require.Equal(t, 0, r.code, r.stderr)
	// 60 rows, holdout 0.25: 45 training rows, sizes round(45/2) = 23
	// (math.Round rounds half away from zero) and 45.
	assert.Contains(t, r.stderr, "curve: fit 1/2 (23 rows) done: ")
	assert.Contains(t, r.stderr, "curve: fit 2/2 (45 rows) done: ")
	r = seine(t, "curve", "-spec", binarySpec, "-data", binaryData, "-steps", "2", "-iterations", "2", "-quiet")
	require.Equal(t, 0, r.code, r.stderr)
	assert.NotContains(t, r.stderr, "fit 1/2")
}
