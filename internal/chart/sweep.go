package chart

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// SweepPlot draws training and validation cost (or accuracy) against the
// penalty strength λ on a logarithmic axis. λ = 0 cannot sit on a log
// axis, so it is drawn one decade below the smallest positive λ, labelled
// "0", and set off by a break mark on the axis; lines join only the
// positive λ, so the λ = 0 point stands alone. The image is Width ×
// Height.
//
// Lambda must be non-empty, finite and ≥ 0, in any order. Train and
// Valid each hold one value per λ or are empty (not both). The spread
// slices are optional: TrainLo and TrainHi are both empty or both the
// length of Train, and likewise for Valid; they are drawn as error bars
// from Lo to Hi (for example the lowest and highest value over folds).
// Points with a non-finite value are dropped. XLabel defaults to
// "penalty strength λ" and YLabel to "cost (nats)".
//
// Without λ = 0 the axis spans the values given, a quarter decade beyond
// each end, with a labelled tick at each value, which suits other
// positive parameters too (units of a layer: set XLabel). With LogY the y
// axis is logarithmic and values ≤ 0 are dropped; it keeps a run-away
// value (the validation cost at λ = 0, say) from flattening the rest.
type SweepPlot struct {
	Title, XLabel, YLabel string
	Lambda                []float64 // penalty strengths, ≥ 0
	Train, Valid          []float64 // one value per λ, or empty
	LogY                  bool      // logarithmic y axis

	TrainLo, TrainHi, ValidLo, ValidHi []float64 // optional spread
}

// Write draws the chart to w in format f. Errors wrap ErrEmpty, ErrLength,
// ErrValue or ErrFormat.
func (s SweepPlot) Write(w io.Writer, f Format) error {
	n := len(s.Lambda)
	if n == 0 {
		return fmt.Errorf("chart: sweep: no λ values: %w", ErrEmpty)
	}
	if len(s.Train) == 0 && len(s.Valid) == 0 {
		return fmt.Errorf("chart: sweep: neither training nor validation values: %w", ErrEmpty)
	}
	for _, c := range []struct {
		name   string
		v      []float64
		lo, hi []float64
	}{{"training", s.Train, s.TrainLo, s.TrainHi}, {"validation", s.Valid, s.ValidLo, s.ValidHi}} {
		if len(c.v) != 0 && len(c.v) != n {
			return fmt.Errorf("chart: sweep: %d %s values for %d λ: %w", len(c.v), c.name, n, ErrLength)
		}
		if len(c.lo) != len(c.hi) || (len(c.lo) != 0 && len(c.lo) != len(c.v)) {
			return fmt.Errorf("chart: sweep: %s spread has %d low and %d high values for %d values: %w", c.name, len(c.lo), len(c.hi), len(c.v), ErrLength)
		}
	}
	minPos, maxPos := math.Inf(1), 0.0
	for i, l := range s.Lambda {
		if !finite(l) || l < 0 {
			return fmt.Errorf("chart: sweep: λ[%d] = %g: want finite and ≥ 0: %w", i, l, ErrValue)
		}
		if l > 0 {
			minPos, maxPos = math.Min(minPos, l), math.Max(maxPos, l)
		}
	}
	// Where λ = 0 goes, and the axis range.
	var zero, xlo, xhi float64
	if maxPos == 0 {
		zero, xlo, xhi = 1, 0.5, 2
	} else {
		dlo := math.Floor(math.Log10(minPos))
		zero = math.Pow(10, dlo-1)
		xlo = zero / math.Pow(10, 0.25)
		xhi = math.Max(math.Pow(10, math.Ceil(math.Log10(maxPos))), minPos*10)
	}
	hasZero := false
	for _, l := range s.Lambda {
		hasZero = hasZero || l == 0
	}
	if !hasZero && maxPos > 0 {
		q := math.Pow(10, 0.25)
		xlo, xhi = minPos/q, maxPos*q
	}
	xpos := func(l float64) float64 {
		if l == 0 {
			return zero
		}
		return l
	}
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return s.Lambda[order[a]] < s.Lambda[order[b]] })

	xlabel, ylabel := s.XLabel, s.YLabel
	if xlabel == "" {
		xlabel = "penalty strength λ"
	}
	if ylabel == "" {
		ylabel = "cost (nats)"
	}
	p := newPlot("", xlabel, ylabel)
	var entries []entry
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for k, c := range []struct {
		name      string
		v, lo, hi []float64
	}{{"training", s.Train, s.TrainLo, s.TrainHi}, {"validation", s.Valid, s.ValidLo, s.ValidHi}} {
		if len(c.v) == 0 {
			continue
		}
		st := styleOf(k)
		entries = append(entries, entry{name: c.name, st: st, line: true})
		var zeroPts, pos plotter.XYs
		var bars plotter.XYs
		var errs plotter.YErrors
		for _, i := range order {
			l, v := s.Lambda[i], c.v[i]
			if !finite(v) || (s.LogY && v <= 0) {
				continue
			}
			ylo, yhi = math.Min(ylo, v), math.Max(yhi, v)
			pt := plotter.XY{X: xpos(l), Y: v}
			if l == 0 {
				zeroPts = append(zeroPts, pt)
			} else {
				pos = append(pos, pt)
			}
			if len(c.lo) > 0 && finite(c.lo[i]) && finite(c.hi[i]) && (!s.LogY || c.lo[i] > 0) {
				ylo, yhi = math.Min(ylo, c.lo[i]), math.Max(yhi, c.hi[i])
				bars = append(bars, pt)
				errs = append(errs, struct{ Low, High float64 }{math.Max(0, v-c.lo[i]), math.Max(0, c.hi[i]-v)})
			}
		}
		if err := addLine(p, pos, st, false); err != nil {
			return err
		}
		if err := addLine(p, zeroPts, st, false); err != nil {
			return err
		}
		if len(bars) > 0 {
			eb, err := plotter.NewYErrorBars(errorBars{bars, errs})
			if err != nil {
				return fmt.Errorf("chart: %w", err)
			}
			eb.LineStyle = st.line
			eb.LineStyle.Dashes = nil
			eb.LineStyle.Width = vg.Points(1)
			p.Add(eb)
		}
	}
	if len(entries) == 0 || math.IsInf(ylo, 1) {
		return fmt.Errorf("chart: sweep: no finite values (positive ones with LogY): %w", ErrEmpty)
	}

	p.X.Scale = plot.LogScale{}
	p.X.Min, p.X.Max = xlo, xhi
	if s.LogY {
		logAxis(&p.Y, ylo, yhi)
	}
	switch {
	case !hasZero && maxPos > 0:
		p.X.Tick.Marker = valueTicks(s.Lambda)
	case maxPos > 0:
		p.X.Tick.Marker = zeroTicks{zero: zero, hasZero: hasZero, first: minPos}
		if hasZero {
			p.Add(breakMark{x: zero * math.Sqrt(10)})
		}
	default:
		p.X.Tick.Marker = plot.ConstantTicks{{Value: 1, Label: "0"}}
	}

	fg := fig{title: s.Title, entries: entries}
	return render(w, f, Width, Height, func(dc draw.Canvas) error {
		p.Draw(fg.body(dc))
		return nil
	})
}

// valueTicks labels each distinct value of v.
func valueTicks(v []float64) plot.ConstantTicks {
	w := append([]float64(nil), v...)
	sort.Float64s(w)
	var ticks plot.ConstantTicks
	for i, x := range w {
		if i == 0 || x != w[i-1] {
			ticks = append(ticks, plot.Tick{Value: x, Label: strconv.FormatFloat(x, 'g', 4, 64)})
		}
	}
	return ticks
}

// errorBars joins points and their error sizes for plotter.NewYErrorBars.
type errorBars struct {
	plotter.XYs
	plotter.YErrors
}

// zeroTicks labels a log λ axis whose λ = 0 point sits at zero: "0" there,
// then the usual log ticks from the decade of the first positive λ up.
type zeroTicks struct {
	zero, first float64
	hasZero     bool
}

func (z zeroTicks) Ticks(lo, hi float64) []plot.Tick {
	start := math.Pow(10, math.Floor(math.Log10(z.first)))
	var ticks []plot.Tick
	if z.hasZero {
		ticks = append(ticks, plot.Tick{Value: z.zero, Label: "0"})
	}
	return append(ticks, logTicks{}.Ticks(start, hi)...)
}

// breakMark draws a "//" across the bottom edge of the data area at x, to
// show that the λ axis is broken between 0 and the positive λ.
type breakMark struct{ x float64 }

func (b breakMark) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, _ := plt.Transforms(&c)
	x := trX(b.x)
	y := c.Min.Y - plt.X.Padding
	sty := draw.LineStyle{Color: plt.X.LineStyle.Color, Width: vg.Points(1.2)}
	const d, h = vg.Length(2.5), vg.Length(5)
	// White gap in the axis line, then two slanted strokes.
	c.FillPolygon(plt.BackgroundColor, []vg.Point{{X: x - d, Y: y - h}, {X: x + d, Y: y - h}, {X: x + d, Y: y + h}, {X: x - d, Y: y + h}})
	for _, dx := range []vg.Length{-d, d} {
		c.StrokeLine2(sty, x+dx-h/2, y-h, x+dx+h/2, y+h)
	}
}
