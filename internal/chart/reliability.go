package chart

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ReliabilityPlot draws a reliability diagram: for each of n equal-width
// bins of predicted probability over [0, 1] (bin b spans [b/n, (b+1)/n]),
// a bar up to the observed frequency (Accuracy) of the bin's items, a
// marker at the bin's mean predicted probability (Confidence) and that
// frequency, and the bin's item count written above the bar; the diagonal
// is perfect calibration. A bar below the diagonal is over-confidence. A
// bin with Count 0 has no bar or marker, only its count "0". The image
// is Width × Height.
//
// Count, Accuracy and Confidence hold one value per bin (n ≥ 1); counts
// are ≥ 0 and a bin with items has Accuracy and Confidence in [0, 1]
// (an empty bin's values are ignored, NaN as a rule). Errors wrap
// ErrEmpty, ErrLength, ErrValue or ErrFormat.
type ReliabilityPlot struct {
	Title      string
	Count      []int
	Accuracy   []float64 // observed frequency per bin, [0, 1]
	Confidence []float64 // mean predicted probability per bin, [0, 1]
}

// Write draws the chart to w in format f.
func (r ReliabilityPlot) Write(w io.Writer, f Format) error {
	n := len(r.Count)
	if n == 0 {
		return fmt.Errorf("chart: reliability: no bins: %w", ErrEmpty)
	}
	if len(r.Accuracy) != n || len(r.Confidence) != n {
		return fmt.Errorf("chart: reliability: %d counts, %d accuracies, %d confidences: %w", n, len(r.Accuracy), len(r.Confidence), ErrLength)
	}
	total := 0
	for b, c := range r.Count {
		if c < 0 {
			return fmt.Errorf("chart: reliability: bin %d: count %d: %w", b, c, ErrValue)
		}
		total += c
		if c > 0 && !(r.Accuracy[b] >= 0 && r.Accuracy[b] <= 1 && r.Confidence[b] >= 0 && r.Confidence[b] <= 1) {
			return fmt.Errorf("chart: reliability: bin %d: accuracy %g, confidence %g outside [0, 1]: %w", b, r.Accuracy[b], r.Confidence[b], ErrValue)
		}
	}
	if total == 0 {
		return fmt.Errorf("chart: reliability: every bin is empty: %w", ErrEmpty)
	}

	p := newPlot("", "predicted probability", "observed frequency")
	barSt := style{line: draw.LineStyle{Color: palette[0], Width: vg.Points(0.75)}}
	fill := color.RGBA{0xB3, 0xD4, 0xEA, 0xFF} // palette[0] lightened, so markers and text stay legible on it
	p.Add(&bars{n: n, count: r.Count, height: r.Accuracy, fill: fill, edge: barSt.line})

	diag := style{line: draw.LineStyle{Color: color.Gray{Y: 0x55}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}}
	l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}})
	if err != nil {
		return fmt.Errorf("chart: %w", err)
	}
	l.LineStyle = diag.line
	p.Add(l)

	mark := styleOf(1) // vermillion, drawn as a filled circle
	mark.glyph.Shape = draw.CircleGlyph{}
	var pts, at plotter.XYs
	var labels []string
	for b := range n {
		y := 0.0
		if r.Count[b] > 0 {
			pts = append(pts, plotter.XY{X: r.Confidence[b], Y: r.Accuracy[b]})
			y = r.Accuracy[b]
		}
		at = append(at, plotter.XY{X: (float64(b) + 0.5) / float64(n), Y: y})
		labels = append(labels, strconv.Itoa(r.Count[b]))
	}
	s, err := plotter.NewScatter(pts)
	if err != nil {
		return fmt.Errorf("chart: %w", err)
	}
	s.GlyphStyle = mark.glyph
	p.Add(s)
	lb, err := plotter.NewLabels(plotter.XYLabels{XYs: at, Labels: labels})
	if err != nil {
		return fmt.Errorf("chart: %w", err)
	}
	size := vg.Points(math.Max(6, math.Min(8, 160/float64(n))))
	for i := range lb.TextStyle {
		lb.TextStyle[i].Font = legendFont
		lb.TextStyle[i].Font.Size = size
		lb.TextStyle[i].XAlign = draw.XCenter
		lb.TextStyle[i].YAlign = draw.YBottom
		lb.TextStyle[i].Color = color.Gray{Y: 0x33}
	}
	lb.Offset = vg.Point{Y: vg.Points(5)} // clear of a marker on the bar's top
	p.Add(lb)

	p.X.Min, p.X.Max = 0, 1
	p.Y.Min, p.Y.Max = 0, 1.08 // room for the count above a full bar
	p.X.Tick.Marker, p.Y.Tick.Marker = unitTicks, unitTicks
	fillSt := style{glyph: draw.GlyphStyle{Color: fill, Radius: vg.Points(4), Shape: draw.BoxGlyph{}}}
	fg := fig{title: r.Title, entries: []entry{
		{name: "observed frequency per bin (count above)", st: fillSt},
		{name: "mean predicted probability", st: mark},
		{name: "perfect calibration", st: diag, line: true},
	}}
	return render(w, f, Width, Height, drawSquare(fg, p))
}

// bars fills bin b, [b/n, (b+1)/n], from 0 up to height[b] and outlines
// it; bins with count 0 are skipped.
type bars struct {
	n      int
	count  []int
	height []float64
	fill   color.Color
	edge   draw.LineStyle
}

// Plot implements plot.Plotter.
func (h *bars) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	for b := range h.n {
		if h.count[b] == 0 {
			continue
		}
		x0, x1 := trX(float64(b)/float64(h.n)), trX(float64(b+1)/float64(h.n))
		y0, y1 := trY(0), trY(h.height[b])
		pts := []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}
		c.FillPolygon(h.fill, c.ClipPolygonXY(pts))
		c.StrokeLines(h.edge, c.ClipLinesXY(append(pts, pts[0]))...)
	}
}

// DataRange implements plot.DataRanger.
func (h *bars) DataRange() (xmin, xmax, ymin, ymax float64) { return 0, 1, 0, 1 }
