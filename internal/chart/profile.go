package chart

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg/draw"
)

// ProfilePlot draws performance profiles (Dolan & Moré 2002): for each
// solver s a right-continuous step line of ρ_s(τ) = rho[s][i] at
// τ = taus[i], held until the next breakpoint and extended to the right
// edge. The τ axis is logarithmic with ticks at powers of two, as Dolan
// & Moré draw it; the y axis is the fraction of problems, [0, 1]. If
// xlabel is empty it reads "performance ratio τ (within a factor τ of
// the best)". The image is Width × Height.
//
// taus must be non-empty, finite, ≥ 1 and strictly increasing; rho must
// hold one row per solver of len(taus) values in [0, 1]. Otherwise the
// error wraps ErrEmpty, ErrLength or ErrValue.
func ProfilePlot(w io.Writer, f Format, title, xlabel string, solvers []string, taus []float64, rho [][]float64) error {
	if len(solvers) == 0 || len(taus) == 0 {
		return fmt.Errorf("chart: profile: %d solvers, %d breakpoints: %w", len(solvers), len(taus), ErrEmpty)
	}
	if len(rho) != len(solvers) {
		return fmt.Errorf("chart: profile: %d solvers but %d rows of rho: %w", len(solvers), len(rho), ErrLength)
	}
	for i, t := range taus {
		if !finite(t) || t < 1 || (i > 0 && !(t > taus[i-1])) {
			return fmt.Errorf("chart: profile: tau[%d] = %g: want finite, ≥ 1, increasing: %w", i, t, ErrValue)
		}
	}
	for s, r := range rho {
		if len(r) != len(taus) {
			return fmt.Errorf("chart: profile: solver %q: %d values for %d breakpoints: %w", solvers[s], len(r), len(taus), ErrLength)
		}
		for i, v := range r {
			if !(v >= 0 && v <= 1) {
				return fmt.Errorf("chart: profile: solver %q: rho[%d] = %g outside [0, 1]: %w", solvers[s], i, v, ErrValue)
			}
		}
	}
	if xlabel == "" {
		xlabel = "performance ratio τ (within a factor τ of the best)"
	}

	// Right edge: the next power of two at least 1.25 × the last break.
	last := taus[len(taus)-1]
	right := math.Max(2, math.Pow(2, math.Ceil(math.Log2(last*1.25))))

	p := newPlot("", xlabel, "fraction of problems ρ(τ)")
	entries := make([]entry, len(solvers))
	for s, name := range solvers {
		st := styleOf(s)
		entries[s] = entry{name: name, st: st, line: true}
		pts := make(plotter.XYs, 0, len(taus)+1)
		for i, t := range taus {
			pts = append(pts, plotter.XY{X: t, Y: rho[s][i]})
		}
		marks := pts // markers at the breakpoints, not at the right edge
		pts = append(pts, plotter.XY{X: right, Y: rho[s][len(taus)-1]})
		if err := addLineMarks(p, pts, marks, st, true); err != nil {
			return err
		}
	}
	p.X.Scale = plot.LogScale{}
	p.X.Min, p.X.Max = 1, right
	p.X.Tick.Marker = pow2Ticks{}
	p.Y.Min, p.Y.Max = 0, 1
	p.Y.Tick.Marker = plot.ConstantTicks{
		{Value: 0, Label: "0"}, {Value: 0.25, Label: "0.25"}, {Value: 0.5, Label: "0.5"},
		{Value: 0.75, Label: "0.75"}, {Value: 1, Label: "1"},
	}

	fg := fig{title: title, entries: entries}
	return render(w, f, Width, Height, func(dc draw.Canvas) error {
		p.Draw(fg.body(dc))
		return nil
	})
}

// pow2Ticks labels a logarithmic axis at powers of two, thinned to at
// most eight labels.
type pow2Ticks struct{}

func (pow2Ticks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) || !finite(hi) {
		return nil
	}
	elo := int(math.Ceil(math.Log2(lo)))
	ehi := int(math.Floor(math.Log2(hi)))
	step := 1
	if n := ehi - elo; n > 8 {
		step = (n + 7) / 8
	}
	var ticks []plot.Tick
	for e := elo; e <= ehi; e++ {
		t := plot.Tick{Value: math.Pow(2, float64(e))}
		if (e-elo)%step == 0 {
			t.Label = strconv.FormatFloat(t.Value, 'g', 6, 64)
		}
		ticks = append(ticks, t)
	}
	return ticks
}
