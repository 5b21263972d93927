package main

import (
	"encoding/json"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestCurveCommand(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "curve.svg")
	r := runIn("curve", "-spec", triageSpec, "-data", triageData, "-steps", "2", "-iterations", "5", "-json", "-plot", plot)
	require.Equal(t, 0, r.code, r.stderr)
	var c map[string]any
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &c), "JSON:\n%s", r.stdout)
	for _, k := range []string{"holdout_rows", "baseline", "shape", "hint", "points"} {
		assert.Contains(t, c, k, "JSON lacks %q", k)
	}
	pts := c["points"].([]any)
	// 3000 rows, default holdout 0.25: 2250 training rows, sizes 1125 and
	// 2250.
	if assert.Len(t, pts, 2, "points") {
		assert.Equal(t, 2250.0, pts[1].(map[string]any)["rows"], "rows of the second point; points = %v", pts)
	}
	checkSVG(t, plot)

	r = runIn("curve", "-spec", triageSpec, "-data", triageData, "-steps", "1", "-iterations", "2")
	assert.Equal(t, 0, r.code, "text report: status; stderr %s", r.stderr)
	assert.Contains(t, r.stdout, "Hint, not a verdict:", "text report")
	assert.Contains(t, r.stdout, "holdout cost", "text report")
}

func TestCurveUsage(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"no spec", []string{"-data", "d"}, "-spec is required"},
		{"steps 0", []string{"-spec", "s", "-data", "d", "-steps", "0"}, "-steps 0"},
		{"holdout 1", []string{"-spec", "s", "-data", "d", "-holdout", "1"}, "-holdout 1"},
		{"plot format", []string{"-spec", "s", "-data", "d", "-plot", "c.gif"}, ".png or .svg"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(append([]string{"curve"}, tt.args...)...)
			require.Equal(t, 2, r.code, "%v: status", tt.args)
			oneLineError(t, r.stderr, tt.want)
		})
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
