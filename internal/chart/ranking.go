package chart

import (
	"fmt"
	"image/color"
	"io"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Mark is an operating point on one curve of a ROCPlot or PRPlot.
type Mark struct {
	Curve int     // index of the curve it lies on, which gives its colour
	X, Y  float64 // in [0, 1]
	Label string  // written beside the point, e.g. "t = 0.42"; may be empty
}

// ROCPlot draws receiver operating characteristic curves: the true
// positive rate (recall) against the false positive rate, both on
// [0, 1], with straight segments between points (the trapezoids whose
// area is the ROC AUC) and the diagonal TPR = FPR of a ranking no better
// than chance for reference. Each curve is one class against the rest;
// its Name goes in the legend (for example "fraud (AUC 0.93)"). Marks
// are operating points, drawn larger, ringed in black and labelled. The
// image is Width × Height.
//
// Curves must be non-empty, each with X (false positive rate) and Y
// (true positive rate) of equal, non-zero length; values outside [0, 1]
// are errors, NaN points are dropped. Errors wrap ErrEmpty, ErrLength,
// ErrValue or ErrFormat.
type ROCPlot struct {
	Title  string
	Curves []Series
	Marks  []Mark
}

// Write draws the chart to w in format f.
func (r ROCPlot) Write(w io.Writer, f Format) error {
	ref := plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}}
	return rateCurves(w, f, "roc", r.Title, "false positive rate (FP / negatives)", "true positive rate (recall)",
		r.Curves, r.Marks, false, ref, "chance")
}

// PRPlot draws precision–recall curves: precision against recall, both
// on [0, 1]. Each curve is drawn as the step function whose area is the
// average precision: precision Pₙ over the recall interval (Rₙ₋₁, Rₙ],
// starting from recall 0 at the first point's precision. X holds the
// recall and Y the precision of each point in order of descending
// threshold (ascending recall). Baseline, when given, holds per curve
// the share of positive rows, the precision of a ranking no better than
// chance, drawn as a thin dotted line in the curve's colour. Marks,
// Names and errors are as for ROCPlot; Baseline must be empty or hold
// one value in [0, 1] per curve. The image is Width × Height.
type PRPlot struct {
	Title    string
	Curves   []Series
	Baseline []float64
	Marks    []Mark
}

// Write draws the chart to w in format f.
func (r PRPlot) Write(w io.Writer, f Format) error {
	if len(r.Baseline) != 0 && len(r.Baseline) != len(r.Curves) {
		return fmt.Errorf("chart: pr: %d baselines for %d curves: %w", len(r.Baseline), len(r.Curves), ErrLength)
	}
	for i, b := range r.Baseline {
		if !(b >= 0 && b <= 1) {
			return fmt.Errorf("chart: pr: baseline[%d] = %g outside [0, 1]: %w", i, b, ErrValue)
		}
	}
	return rateCurves(w, f, "pr", r.Title, "recall (TP / positives)", "precision (TP / predicted positive)",
		r.Curves, r.Marks, true, nil, "", r.Baseline...)
}

// rateCurves draws curves on the unit square: a reference line ref (may
// be nil) named refName, per-curve horizontal baselines, the curves
// (stepped as precision–recall when step is set) and the marks.
func rateCurves(w io.Writer, f Format, what, title, xlabel, ylabel string, curves []Series, marks []Mark,
	step bool, ref plotter.XYs, refName string, baselines ...float64) error {
	if len(curves) == 0 {
		return fmt.Errorf("chart: %s: no curves: %w", what, ErrEmpty)
	}
	for i, c := range curves {
		if len(c.X) == 0 {
			return fmt.Errorf("chart: %s: curve %q has no points: %w", what, c.Name, ErrEmpty)
		}
		if len(c.X) != len(c.Y) {
			return fmt.Errorf("chart: %s: curve %q: %d x values, %d y values: %w", what, c.Name, len(c.X), len(c.Y), ErrLength)
		}
		for j := range c.X {
			if !unitOrNaN(c.X[j]) || !unitOrNaN(c.Y[j]) {
				return fmt.Errorf("chart: %s: curve %d (%q), point %d: (%g, %g) outside [0, 1]: %w", what, i, c.Name, j, c.X[j], c.Y[j], ErrValue)
			}
		}
	}
	for i, m := range marks {
		if m.Curve < 0 || m.Curve >= len(curves) {
			return fmt.Errorf("chart: %s: mark %d on curve %d of %d: %w", what, i, m.Curve, len(curves), ErrValue)
		}
		if !(m.X >= 0 && m.X <= 1 && m.Y >= 0 && m.Y <= 1) {
			return fmt.Errorf("chart: %s: mark %d at (%g, %g) outside [0, 1]: %w", what, i, m.X, m.Y, ErrValue)
		}
	}

	p := newPlot("", xlabel, ylabel)
	var entries []entry
	if ref != nil {
		grey := style{line: draw.LineStyle{Color: color.Gray{Y: 0x88}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}}
		l, err := plotter.NewLine(ref)
		if err != nil {
			return fmt.Errorf("chart: %w", err)
		}
		l.LineStyle = grey.line
		p.Add(l)
		entries = append(entries, entry{name: refName, st: grey, line: true})
	}
	for i, b := range baselines {
		st := styleOf(i)
		st.line.Width = vg.Points(0.75)
		st.line.Dashes = []vg.Length{vg.Points(1), vg.Points(3)}
		l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: b}, {X: 1, Y: b}})
		if err != nil {
			return fmt.Errorf("chart: %w", err)
		}
		l.LineStyle = st.line
		p.Add(l)
	}
	if len(baselines) > 0 {
		st := style{line: draw.LineStyle{Color: color.Gray{Y: 0x55}, Width: vg.Points(0.75), Dashes: []vg.Length{vg.Points(1), vg.Points(3)}}}
		entries = append(entries, entry{name: "share of positives (chance)", st: st, line: true})
	}
	drawn := 0
	for i, c := range curves {
		st := styleOf(i)
		entries = append(entries, entry{name: c.Name, st: st, line: true})
		pts := points(c.X, c.Y, false)
		drawn += len(pts)
		if len(pts) == 0 {
			continue
		}
		if !step {
			if err := addLine(p, pts, st, false); err != nil {
				return err
			}
			continue
		}
		line := append(plotter.XYs{{X: 0, Y: pts[0].Y}}, pts...)
		l, err := plotter.NewLine(line)
		if err != nil {
			return fmt.Errorf("chart: %w", err)
		}
		l.LineStyle = st.line
		l.StepStyle = plotter.PreStep // precision Pₙ over (Rₙ₋₁, Rₙ]
		p.Add(l)
		if err := addLineMarks(p, pts[:1], pts, st, false); err != nil { // markers only
			return err
		}
	}
	if drawn == 0 {
		return fmt.Errorf("chart: %s: no finite points: %w", what, ErrEmpty)
	}
	if len(marks) > 0 {
		ring := draw.GlyphStyle{Color: color.Black, Radius: vg.Points(6), Shape: draw.RingGlyph{}}
		var xys plotter.XYs
		var labels []string
		for _, m := range marks {
			fill := styleOf(m.Curve).glyph
			fill.Radius = vg.Points(4.5)
			fill.Shape = draw.CircleGlyph{}
			pt := plotter.XYs{{X: m.X, Y: m.Y}}
			for _, g := range []draw.GlyphStyle{fill, ring} {
				s, err := plotter.NewScatter(pt)
				if err != nil {
					return fmt.Errorf("chart: %w", err)
				}
				s.GlyphStyle = g
				p.Add(s)
			}
			if m.Label != "" {
				xys = append(xys, pt[0])
				labels = append(labels, m.Label)
			}
		}
		if len(labels) > 0 {
			lb, err := plotter.NewLabels(plotter.XYLabels{XYs: xys, Labels: labels})
			if err != nil {
				return fmt.Errorf("chart: %w", err)
			}
			for i := range lb.TextStyle {
				lb.TextStyle[i].Font = legendFont
				lb.TextStyle[i].YAlign = draw.YTop
			}
			lb.Offset = vg.Point{X: vg.Points(7), Y: -vg.Points(5)}
			p.Add(lb)
		}
		entries = append(entries, entry{name: "operating point", st: style{glyph: ring}})
	}
	p.X.Min, p.X.Max = 0, 1
	p.Y.Min, p.Y.Max = 0, 1.02 // room for a curve along the top edge
	p.X.Tick.Marker, p.Y.Tick.Marker = unitTicks, unitTicks
	return render(w, f, Width, Height, drawSquare(fig{title: title, entries: entries}, p))
}

// unitTicks label an axis over [0, 1] in steps of 0.2.
var unitTicks = plot.ConstantTicks{
	{Value: 0, Label: "0"}, {Value: 0.2, Label: "0.2"}, {Value: 0.4, Label: "0.4"},
	{Value: 0.6, Label: "0.6"}, {Value: 0.8, Label: "0.8"}, {Value: 1, Label: "1"},
}

// drawSquare returns the drawing of p in the body of fg, narrowed to its
// height and centred: a square data area reads the unit interval on both
// axes alike.
func drawSquare(fg fig, p *plot.Plot) func(dc draw.Canvas) error {
	return func(dc draw.Canvas) error {
		body := fg.body(dc)
		side := body.Max.Y - body.Min.Y + 1.2*vg.Centimeter
		if wdt := body.Max.X - body.Min.X; wdt > side {
			body.Min.X += (wdt - side) / 2
			body.Max.X = body.Min.X + side
		}
		p.Draw(body)
		return nil
	}
}

// unitOrNaN reports whether v is NaN or in [0, 1].
func unitOrNaN(v float64) bool { return v != v || (v >= 0 && v <= 1) }
