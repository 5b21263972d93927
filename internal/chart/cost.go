package chart

import (
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Series is one named line: Y against X, drawn in the order given.
type Series struct {
	Name string
	X, Y []float64
}

// Band is a line with a spread around it, for example the median and
// the range over several seeds: Mid against X, with Lo and Hi the lower
// and upper edges of the spread at each X.
type Band struct {
	Name           string
	X, Lo, Mid, Hi []float64
}

// CostPlot draws cost against evaluations (left panel) and against wall
// time (right panel), one line per method, on a logarithmic cost axis
// shared by both panels. Each method keeps its style in both panels,
// matched by Series.Name. With both panels the image is WideWidth ×
// Height; with only one of ByEvals or BySeconds it is Width × Height.
//
// When Relative is false the y axis is the cost itself and points with
// cost ≤ 0 are dropped (they cannot be drawn on a log axis). When
// Relative is true the y axis is cost − c*, with c* the lowest finite cost
// in any series, floored at
//
//	floor = max(g/10, 1e-15·max(1, |c*|))
//
// where g is the smallest positive gap cost − c* seen (so the run that
// reached c* ends one decade below the next-closest point instead of at
// −∞); c* is then reported in the title ("best cost … nats").
type CostPlot struct {
	Title     string   // drawn across the top; may be empty
	ByEvals   []Series // X: evaluations (count), Y: cost (nats)
	BySeconds []Series // X: wall time (s), Y: cost (nats)
	Relative  bool     // plot cost − best cost instead of cost
}

// Write draws the chart to w in format f. It returns an error wrapping
// ErrEmpty when there are no series or a series has no points, or nothing
// is left to draw after dropping points; ErrLength when a series' X and Y
// differ in length; ErrFormat for an unknown f.
func (c CostPlot) Write(w io.Writer, f Format) error {
	if len(c.ByEvals) == 0 && len(c.BySeconds) == 0 {
		return fmt.Errorf("chart: cost plot has no series: %w", ErrEmpty)
	}
	// One style per distinct name, in order of first appearance.
	index := map[string]int{}
	var entries []entry
	for _, group := range [][]Series{c.ByEvals, c.BySeconds} {
		for _, s := range group {
			if len(s.X) != len(s.Y) {
				return fmt.Errorf("chart: series %q: %d x values and %d y values: %w", s.Name, len(s.X), len(s.Y), ErrLength)
			}
			if len(s.X) == 0 {
				return fmt.Errorf("chart: series %q: %w", s.Name, ErrEmpty)
			}
			if _, ok := index[s.Name]; !ok {
				index[s.Name] = len(entries)
				entries = append(entries, entry{name: s.Name, st: styleOf(len(entries)), line: true})
			}
		}
	}

	best := math.Inf(1)
	for _, group := range [][]Series{c.ByEvals, c.BySeconds} {
		for _, s := range group {
			for i, y := range s.Y {
				if finite(y) && finite(s.X[i]) && y < best {
					best = y
				}
			}
		}
	}
	ylabel := "cost (nats)"
	note := "" // added to the title
	transform := func(y float64) float64 { return y }
	if c.Relative && finite(best) {
		gap := math.Inf(1)
		for _, group := range [][]Series{c.ByEvals, c.BySeconds} {
			for _, s := range group {
				for _, y := range s.Y {
					if d := y - best; finite(d) && d > 0 && d < gap {
						gap = d
					}
				}
			}
		}
		floor := 1e-15 * math.Max(1, math.Abs(best))
		if finite(gap) {
			floor = math.Max(gap/10, floor)
		}
		transform = func(y float64) float64 { return math.Max(y-best, floor) }
		ylabel = "cost − best cost (nats)"
		note = fmt.Sprintf("best cost %.4g nats", best)
	}

	// Transformed points of each panel, and the shared y range.
	lo, hi := math.Inf(1), math.Inf(-1)
	type panel struct {
		xlabel, title string
		series        []Series
	}
	var panels []panel
	if len(c.ByEvals) > 0 {
		panels = append(panels, panel{"evaluations (count)", "against evaluations", c.ByEvals})
	}
	if len(c.BySeconds) > 0 {
		panels = append(panels, panel{"wall time (s)", "against wall time", c.BySeconds})
	}
	plots := make([]*plot.Plot, len(panels))
	drawn := 0
	for k, pn := range panels {
		p := newPlot(pn.title, pn.xlabel, "") // y label drawn by drawOwnYLabel
		for _, s := range pn.series {
			y := make([]float64, len(s.Y))
			for i, v := range s.Y {
				y[i] = transform(v)
			}
			pts := points(s.X, y, true)
			for _, pt := range pts {
				lo, hi = math.Min(lo, pt.Y), math.Max(hi, pt.Y)
			}
			drawn += len(pts)
			if err := addLine(p, pts, entries[index[s.Name]].st, false); err != nil {
				return err
			}
		}
		plots[k] = p
	}
	if drawn == 0 {
		return fmt.Errorf("chart: cost plot: no finite positive points to draw: %w", ErrEmpty)
	}
	for _, p := range plots {
		logAxis(&p.Y, lo, hi)
	}

	width := WideWidth
	if len(plots) == 1 {
		width = Width
	}
	title := c.Title
	switch {
	case note != "" && title != "":
		title += " (" + note + ")"
	case note != "":
		title = note
	}
	fg := fig{title: title, entries: entries}
	return render(w, f, width, Height, func(dc draw.Canvas) error {
		body := fg.body(dc)
		// The panels share their y axis and have one row of x tick
		// labels each, so equal tiles give equal data areas.
		tiles := draw.Tiles{Rows: 1, Cols: len(plots), PadX: vg.Centimeter}
		for k, p := range plots {
			drawOwnYLabel(tiles.At(body, k, 0), p, ylabel)
		}
		return nil
	})
}
