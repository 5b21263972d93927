package chart

import (
	"bytes"
	"errors"
	"testing"
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
	if err := sp.Write(&buf, SVG); err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(buf.Bytes(), []byte(">16<")) || !bytes.Contains(buf.Bytes(), []byte(">32<")) {
		t.Error("value ticks 16 and 32 not labelled in the SVG")
	}
	ticks := valueTicks([]float64{32, 8, 16, 8})
	if len(ticks) != 3 || ticks[0].Label != "8" || ticks[2].Label != "32" {
		t.Errorf("valueTicks = %v, want 8, 16, 32", ticks)
	}
	// Nothing positive to draw on a log axis.
	err := SweepPlot{Lambda: []float64{1}, Train: []float64{0}, LogY: true}.Write(&buf, PNG)
	if !errors.Is(err, ErrEmpty) {
		t.Errorf("only non-positive values on a log axis: err = %v, want ErrEmpty", err)
	}
}
