package chart

import (
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot/vg/draw"
)

// CurvePlot draws a learning curve: training and holdout cost against the
// number of training rows, on linear axes that start at 0 when the
// data are not negative, so gaps between the curves read in proportion. Rows must be non-empty; Train
// and Holdout each hold one value per entry of Rows or are empty (not
// both). Points with a non-finite value are dropped. The image is Width ×
// Height.
type CurvePlot struct {
	Title          string
	Rows           []float64 // training rows used (count)
	Train, Holdout []float64 // cost (nats) on the training rows and on the holdout
}

// Write draws the chart to w in format f. Errors wrap ErrEmpty, ErrLength
// or ErrFormat.
func (c CurvePlot) Write(w io.Writer, f Format) error {
	n := len(c.Rows)
	if n == 0 {
		return fmt.Errorf("chart: curve: no rows: %w", ErrEmpty)
	}
	if len(c.Train) == 0 && len(c.Holdout) == 0 {
		return fmt.Errorf("chart: curve: neither training nor holdout values: %w", ErrEmpty)
	}
	p := newPlot("", "training rows (count)", "cost (nats)")
	var entries []entry
	drawn := 0
	for k, s := range []Series{{Name: "training", Y: c.Train}, {Name: "holdout", Y: c.Holdout}} {
		if len(s.Y) == 0 {
			continue
		}
		if len(s.Y) != n {
			return fmt.Errorf("chart: curve: %d %s values for %d row counts: %w", len(s.Y), s.Name, n, ErrLength)
		}
		st := styleOf(k)
		entries = append(entries, entry{name: s.Name, st: st, line: true})
		pts := points(c.Rows, s.Y, false)
		drawn += len(pts)
		if err := addLine(p, pts, st, false); err != nil {
			return err
		}
	}
	if drawn == 0 {
		return fmt.Errorf("chart: curve: no finite points: %w", ErrEmpty)
	}
	p.X.Min = math.Min(p.X.Min, 0)
	p.Y.Min = math.Min(p.Y.Min, 0)
	fg := fig{title: c.Title, entries: entries}
	return render(w, f, Width, Height, func(dc draw.Canvas) error {
		p.Draw(fg.body(dc))
		return nil
	})
}
