package chart

import (
	"bytes"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSweepLogYAndValueTicks: a log y axis drops values ≤ 0 (they cannot
// sit on it) and still draws the rest; without λ = 0 each value gets its
// own labelled tick.
func TestSweepLogYAndValueTicks(t *testing.T) {
	var buf bytes.Buffer
	sp := SweepPlot{
		XLabel: "units", Lambda: []float64{32, 8, 16}, LogY: true,
		Train: []float64{0.01, 0, 0.05}, Valid: []float64{4, 0.2, 0.3},
		ValidLo: []float64{2, 0.1, 0.2}, ValidHi: []float64{5, 0.3, 0.4},
	}
	require.NoError(t, sp.Write(&buf, SVG))
	// bytes.Contains rather than assert.Contains: a failure need not
	// print the whole SVG.
	assert.True(t, bytes.Contains(buf.Bytes(), []byte(">16<")), "value tick 16 not labelled in the SVG")
	assert.True(t, bytes.Contains(buf.Bytes(), []byte(">32<")), "value tick 32 not labelled in the SVG")
	ticks := valueTicks([]float64{32, 8, 16, 8})
	if assert.Len(t, ticks, 3, "valueTicks, want 8, 16, 32") {
		assert.Equal(t, "8", ticks[0].Label, "valueTicks = %v, want 8, 16, 32", ticks)
		assert.Equal(t, "32", ticks[2].Label, "valueTicks = %v, want 8, 16, 32", ticks)
	}
	// Nothing positive to draw on a log axis.
	err := SweepPlot{Lambda: []float64{1}, Train: []float64{0}, LogY: true}.Write(&buf, PNG)
	assert.ErrorIs(t, err, ErrEmpty, "only non-positive values on a log axis")
}
