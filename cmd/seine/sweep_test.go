package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/diag"
)

func TestSweepCommand(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "sweep.png")
	r := runIn("sweep", "-spec", triageSpec, "-data", triageData, "-l2", "0,1,10", "-units", "4,8",
		"-folds", "2", "-iterations", "5", "-json", "-plot", plot)
	require.Equal(t, 0, r.code, r.stderr)
	var sweeps []map[string]any
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &sweeps), "JSON:\n%s", r.stdout)
	require.Len(t, sweeps, 2, "sweeps = %v", sweeps)
	require.Equal(t, "l2", sweeps[0]["param"], "sweeps = %v", sweeps)
	require.Equal(t, "units", sweeps[1]["param"], "sweeps = %v", sweeps)
	pts := sweeps[0]["points"].([]any)
	require.Len(t, pts, 3, "points")
	p := pts[0].(map[string]any)
	for _, k := range []string{"l2", "units", "train_cost", "valid_cost", "train_accuracy", "valid_accuracy"} {
		assert.Contains(t, p, k, "point lacks %q", k)
	}
	vc := p["valid_cost"].(map[string]any)
	for _, k := range []string{"mean", "sd", "min", "max"} {
		assert.Contains(t, vc, k, "valid_cost lacks %q", k)
	}
	assert.Equal(t, 2.0, sweeps[0]["folds"], "folds")
	checkPNG(t, plot, pngNarrow, pngHeight)
	checkPNG(t, filepath.Join(dir, "sweep-units.png"), pngNarrow, pngHeight)
}

func TestSweepUsage(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"nothing to sweep", []string{"-spec", "s", "-data", "d"}, "-l2 LIST, -units LIST"},
		{"bad number", []string{"-spec", "s", "-data", "d", "-l2", "0,x"}, `item 2 is "x"`},
		{"negative", []string{"-spec", "s", "-data", "d", "-l2", "-1"}, "finite number ≥ 0"},
		{"bad units", []string{"-spec", "s", "-data", "d", "-units", "0"}, "whole number ≥ 1"},
		{"one fold", []string{"-spec", "s", "-data", "d", "-l2", "1", "-folds", "1"}, "-folds 1"},
		{"both", []string{"-spec", "s", "-data", "d", "-l2", "1", "-folds", "3", "-holdout", "0.2"}, "not both"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(append([]string{"sweep"}, tt.args...)...)
			require.Equal(t, 2, r.code, "status; stderr %q", r.stderr)
			oneLineError(t, r.stderr, tt.want)
		})
	}
}

// TestFitProgressTerminal: on a terminal the line is redrawn in place
// (carriage return, padded over a longer previous line), at most every
// redraw interval except at the last fit, and ended with a newline.
func TestFitProgressTerminal(t *testing.T) {
	var b bytes.Buffer
	fp := newFitProgress(&b, true, "sweep", func(f diag.FitDone) string { return fitLabel("λ = 0.1", f) })
	fp.fit(diag.FitDone{Done: 1, Total: 4, Fold: 0, Folds: 2, Elapsed: time.Second})
	fp.fit(diag.FitDone{Done: 2, Total: 4, Fold: 1, Folds: 2, Elapsed: 2 * time.Second}) // within 100 ms: not redrawn
	fp.fit(diag.FitDone{Done: 4, Total: 4, Fold: 1, Folds: 2, Elapsed: 4 * time.Second})
	fp.done()
	got := b.String()
	lines := strings.Split(got, "\r")
	require.Len(t, lines, 3, "%q", got)
	// 1 s for 1 fit of 4: about 3 s left (the mean time per fit so far).
	assert.Equal(t, "[#####...............]  1/4  λ = 0.1, fold 1/2  1.0s, about 3.0s left", lines[1])
	assert.True(t, strings.HasPrefix(lines[2], "[####################]  4/4  λ = 0.1, fold 2/2  4.0s  "), "%q", lines[2])
	assert.True(t, strings.HasSuffix(got, " \n"), "the last line is padded over the longer first and ended: %q", got)
}

// TestFitProgressPlainAndQuiet: elsewhere a plain line per finished fit;
// silent with -quiet.
func TestFitProgressPlainAndQuiet(t *testing.T) {
	var b bytes.Buffer
	fp := newFitProgress(&b, false, "curve", func(f diag.FitDone) string { return fmt.Sprintf("%d rows", f.Rows) })
	fp.fit(diag.FitDone{Done: 1, Total: 2, Rows: 30, Elapsed: 1500 * time.Millisecond})
	fp.fit(diag.FitDone{Done: 2, Total: 2, Rows: 60, Elapsed: 4 * time.Second})
	fp.done()
	assert.Equal(t, "curve: fit 1/2 (30 rows) done: 1.5s, about 1.5s left\ncurve: fit 2/2 (60 rows) done: 4.0s\n", b.String())

	// Through the tool: standard error is a pipe here, so plain lines.
	r := seine(t, "sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0,1", "-folds", "2", "-iterations", "2")
	require.Equal(t, 0, r.code, r.stderr)
	for i, want := range []string{"fit 1/4 (λ = 0, fold 1/2)", "fit 2/4 (λ = 0, fold 2/2)", "fit 3/4 (λ = 1, fold 1/2)", "fit 4/4 (λ = 1, fold 2/2) done: "} {
		assert.Contains(t, r.stderr, "sweep: "+want, "line %d", i+1)
	}
	r = seine(t, "sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0,1", "-folds", "2", "-iterations", "2", "-quiet")
	require.Equal(t, 0, r.code, r.stderr)
	assert.NotContains(t, r.stderr, "fit 1/4")
}

// TestSweepEdgeWarning (issue 12, item 4): a best value at the top of the
// grid, or at its bottom unless that cannot be lowered (λ = 0, one unit),
// is named with the flag to extend, on standard error and under warnings
// in -json.
func TestSweepEdgeWarning(t *testing.T) {
	sw := func(param diag.SweepParam, best int, xs ...float64) *diag.Sweep {
		s := &diag.Sweep{Param: param, Best: best, Folds: 1}
		for _, x := range xs {
			s.Points = append(s.Points, diag.SweepPoint{Lambda: x, Units: int(x)})
		}
		return s
	}
	for _, tt := range []struct {
		name string
		sw   *diag.Sweep
		want string
	}{
		{"highest λ", sw(diag.PenaltyL2, 1, 0.1, 10, 1), "λ = 10, the highest value of the grid; the best may lie above it: extend -l2"},
		{"lowest λ", sw(diag.PenaltyL2, 0, 0.1, 1, 10), "λ = 0.1, the lowest value of the grid; the best may lie below it: extend -l2"},
		{"λ = 0", sw(diag.PenaltyL2, 0, 0, 1, 10), ""},
		{"inside", sw(diag.PenaltyL2, 1, 0, 1, 10), ""},
		{"one value", sw(diag.PenaltyL2, 0, 1), ""},
		{"most units", sw(diag.HiddenUnits, 2, 2, 4, 8), "units = 8, the highest value of the grid; the best may lie above it: extend -units"},
		{"one unit", sw(diag.HiddenUnits, 0, 1, 4, 8), ""},
	} {
		t.Run(tt.name, func(t *testing.T) {
			got := edgeWarning(tt.sw)
			if tt.want == "" {
				assert.Empty(t, got)
			} else {
				assert.Contains(t, got, tt.want)
			}
		})
	}
	// Through the tool: 3 iterations leave every net far from its minimum,
	// where the smallest penalty fits best (measured): λ = 0.001, the lowest
	// value.
	r := seine(t, "sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0.001,100", "-folds", "2", "-iterations", "3", "-json", "-quiet")
	require.Equal(t, 0, r.code, r.stderr)
	var out []struct{ Warnings []string }
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	require.Len(t, out, 1)
	assert.Contains(t, out[0].Warnings, "the lowest validation cost is at λ = 0.001, the lowest value of the grid; the best may lie below it: extend -l2")
	assert.Contains(t, r.stderr, "sweep: warning: the lowest validation cost is at λ = 0.001")
}
