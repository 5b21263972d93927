package main

import (
	"encoding/json"
	"path/filepath"
	"testing"
)

func TestSweepCommand(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "sweep.png")
	r := runIn("sweep", "-spec", triageSpec, "-data", triageData, "-l2", "0,1,10", "-units", "4,8",
		"-folds", "2", "-iterations", "5", "-json", "-plot", plot)
	if r.code != 0 {
		t.Fatalf("status %d: %s", r.code, r.stderr)
	}
	var sweeps []map[string]any
	if err := json.Unmarshal([]byte(r.stdout), &sweeps); err != nil {
		t.Fatalf("JSON: %v\n%s", err, r.stdout)
	}
	if len(sweeps) != 2 || sweeps[0]["param"] != "l2" || sweeps[1]["param"] != "units" {
		t.Fatalf("sweeps = %v", sweeps)
	}
	pts := sweeps[0]["points"].([]any)
	if len(pts) != 3 {
		t.Fatalf("%d points, want 3", len(pts))
	}
	p := pts[0].(map[string]any)
	for _, k := range []string{"l2", "units", "train_cost", "valid_cost", "train_accuracy", "valid_accuracy"} {
		if _, ok := p[k]; !ok {
			t.Errorf("point lacks %q", k)
		}
	}
	vc := p["valid_cost"].(map[string]any)
	for _, k := range []string{"mean", "sd", "min", "max"} {
		if _, ok := vc[k]; !ok {
			t.Errorf("valid_cost lacks %q", k)
		}
	}
	if sweeps[0]["folds"].(float64) != 2 {
		t.Errorf("folds = %v, want 2", sweeps[0]["folds"])
	}
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
			if r.code != 2 {
				t.Fatalf("status %d, want 2; stderr %q", r.code, r.stderr)
			}
			oneLineError(t, r.stderr, tt.want)
		})
	}
}
