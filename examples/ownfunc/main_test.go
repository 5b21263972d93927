package main

import (
	"bytes"
	"strconv"
	"strings"
	"testing"
)

// The fit recovers the generating parameters: with 200 points and noise
// σ = 0.05 the least-squares estimates lie within a few standard errors,
// well inside 0.1 of (2, 1.3, 0.5) (the synthetic data's own truth).
func TestRun(t *testing.T) {
	var buf bytes.Buffer
	if err := run(&buf); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	if len(lines) != 3 {
		t.Fatalf("output:\n%s", buf.String())
	}
	for _, l := range lines[1:] {
		f := strings.Fields(l)
		if f[1] != "GradConverged" {
			t.Errorf("%s: status %s", f[0], f[1])
		}
		for i, want := range []float64{2, 1.3, 0.5} {
			got, err := strconv.ParseFloat(f[5+i], 64)
			if err != nil || got < want-0.1 || got > want+0.1 {
				t.Errorf("%s: parameter %d = %s, want %g ± 0.1", f[0], i, f[5+i], want)
			}
		}
	}
	t.Log("\n" + buf.String())
}
