package main

import (
	"bytes"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The fit recovers the generating parameters: with 200 points and noise
// σ = 0.05 the least-squares estimates lie within a few standard errors,
// well inside 0.1 of (2, 1.3, 0.5) (the synthetic data's own truth).
func TestRun(t *testing.T) {
	var buf bytes.Buffer
	require.NoError(t, run(&buf))
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	require.Len(t, lines, 3, "output:\n%s", buf.String())
	for _, l := range lines[1:] {
		f := strings.Fields(l)
		assert.Equal(t, "GradConverged", f[1], "%s: status", f[0])
		for i, want := range []float64{2, 1.3, 0.5} {
			got, err := strconv.ParseFloat(f[5+i], 64)
			if assert.NoError(t, err, "%s: parameter %d", f[0], i) {
				assert.InDelta(t, want, got, 0.1, "%s: parameter %d = %s, want %g ± 0.1", f[0], i, f[5+i], want)
			}
		}
	}
	t.Log("\n" + buf.String())
}
