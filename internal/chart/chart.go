package chart

import (
	"errors"
	"fmt"
	"image/color"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Format is an image file format.
type Format int

const (
	// PNG is a raster image at DPI dots per inch. It is the zero value.
	PNG Format = iota
	// SVG is a vector image.
	SVG
)

// String returns "png" or "svg".
func (f Format) String() string {
	switch f {
	case PNG:
		return "png"
	case SVG:
		return "svg"
	}
	return "Format(" + strconv.Itoa(int(f)) + ")"
}

// Sizes of the images, and the PNG resolution.
const (
	Width     = 16 * vg.Centimeter // width of a single-panel chart
	WideWidth = 28 * vg.Centimeter // width of the two-panel cost chart
	Height    = 10 * vg.Centimeter // height of every chart
	DPI       = 150                // PNG dots per inch
)

// Errors returned by the charts.
var (
	// ErrFormat means an unknown Format value or file extension.
	ErrFormat = errors.New("chart: unknown image format")
	// ErrLength means slices that must be of equal length are not.
	ErrLength = errors.New("chart: mismatched lengths")
	// ErrEmpty means a series or table with no values.
	ErrEmpty = errors.New("chart: no data")
	// ErrValue means a value outside its valid range (for example a
	// negative count or penalty strength).
	ErrValue = errors.New("chart: invalid value")
)

// FormatOf returns the Format named by the extension of path: ".png" or
// ".svg", in any letter case. Other extensions give ErrFormat.
func FormatOf(path string) (Format, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".png":
		return PNG, nil
	case ".svg":
		return SVG, nil
	}
	return 0, fmt.Errorf("chart: %q: want a .png or .svg file: %w", path, ErrFormat)
}

// render makes a canvas of the given size in format f, lets paint draw on
// it and writes the image to w. A panic inside the plotting code (which
// validation should already prevent) is returned as an error.
func render(w io.Writer, f Format, width, height vg.Length, paint func(dc draw.Canvas) error) (err error) {
	var cw vg.CanvasWriterTo
	switch f {
	case PNG:
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(DPI))}
	case SVG:
		cw = vgsvg.New(width, height)
	default:
		return fmt.Errorf("chart: %v: %w", f, ErrFormat)
	}
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("chart: drawing failed: %v", r)
		}
	}()
	dc := draw.New(cw)
	if err := paint(dc); err != nil {
		return err
	}
	if _, err := cw.WriteTo(w); err != nil {
		return fmt.Errorf("chart: writing %v: %w", f, err)
	}
	return nil
}

// palette is the colour-blind-safe palette of Okabe & Ito (2008), "Color
// universal design", without its yellow (too faint on white).
var palette = []color.Color{
	color.RGBA{0x00, 0x72, 0xB2, 0xFF}, // blue
	color.RGBA{0xD5, 0x5E, 0x00, 0xFF}, // vermillion
	color.RGBA{0x00, 0x9E, 0x73, 0xFF}, // bluish green
	color.RGBA{0xCC, 0x79, 0xA7, 0xFF}, // reddish purple
	color.RGBA{0xE6, 0x9F, 0x00, 0xFF}, // orange
	color.RGBA{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
	color.RGBA{0x00, 0x00, 0x00, 0xFF}, // black
}

// dashes are the line patterns, in points: solid, dashed, dotted,
// dash-dot, long dash, sparse dots, dash-dot-dot.
var dashes = [][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2)},
	{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(12), vg.Points(4)},
	{vg.Points(1.5), vg.Points(5)},
	{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
}

// glyphs are the marker shapes.
var glyphs = []draw.GlyphDrawer{
	draw.CircleGlyph{},
	draw.TriangleGlyph{},
	draw.SquareGlyph{},
	draw.CrossGlyph{},
	draw.PlusGlyph{},
	draw.RingGlyph{},
	draw.PyramidGlyph{},
	draw.BoxGlyph{},
}

// style is how one named line is drawn.
type style struct {
	line  draw.LineStyle
	glyph draw.GlyphStyle
}

// styleOf returns the i-th line style: colour, dash and marker all change
// with i, so any two of the first seven lines differ in all three.
func styleOf(i int) style {
	c := palette[i%len(palette)]
	return style{
		line: draw.LineStyle{
			Color:  c,
			Width:  vg.Points(1.5),
			Dashes: dashes[i%len(dashes)],
		},
		glyph: draw.GlyphStyle{
			Color:  c,
			Radius: vg.Points(3),
			Shape:  glyphs[i%len(glyphs)],
		},
	}
}

// maxMarkers is the most markers drawn along one line; long lines get
// markers at evenly spaced indices so the shapes stay legible.
const maxMarkers = 12

// addLine adds pts to p as a line in style st, with at most maxMarkers
// markers. stepped draws a right-continuous step function.
func addLine(p *plot.Plot, pts plotter.XYs, st style, stepped bool) error {
	return addLineMarks(p, pts, pts, st, stepped)
}

// addLineMarks is addLine with markers placed on marks instead of pts.
func addLineMarks(p *plot.Plot, pts, marks plotter.XYs, st style, stepped bool) error {
	if len(pts) == 0 {
		return nil
	}
	if len(pts) > 1 {
		l, err := plotter.NewLine(pts)
		if err != nil {
			return fmt.Errorf("chart: %w", err)
		}
		l.LineStyle = st.line
		if stepped {
			l.StepStyle = plotter.PostStep
		}
		p.Add(l)
	}
	if len(marks) > maxMarkers {
		all := marks
		marks = make(plotter.XYs, 0, maxMarkers)
		for k := range maxMarkers {
			marks = append(marks, all[k*(len(all)-1)/(maxMarkers-1)])
		}
	}
	if len(marks) == 0 {
		return nil
	}
	s, err := plotter.NewScatter(marks)
	if err != nil {
		return fmt.Errorf("chart: %w", err)
	}
	s.GlyphStyle = st.glyph
	p.Add(s)
	return nil
}

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// points pairs x and y, dropping pairs with a non-finite coordinate and,
// when logY is set, pairs with y ≤ 0.
func points(x, y []float64, logY bool) plotter.XYs {
	pts := make(plotter.XYs, 0, len(x))
	for i := range x {
		if !finite(x[i]) || !finite(y[i]) || (logY && y[i] <= 0) {
			continue
		}
		pts = append(pts, plotter.XY{X: x[i], Y: y[i]})
	}
	return pts
}

// newPlot returns a plot with the package's fonts and grid lines.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.X.Label.TextStyle.Font.Size = vg.Points(10)
	p.Y.Label.TextStyle.Font.Size = vg.Points(10)
	p.X.Tick.Label.Font.Size = vg.Points(9)
	p.Y.Tick.Label.Font.Size = vg.Points(9)
	g := plotter.NewGrid()
	g.Vertical.Color = color.Gray{Y: 0xDD}
	g.Horizontal.Color = color.Gray{Y: 0xDD}
	p.Add(g)
	return p
}

// logAxis makes a a base-10 logarithmic axis covering [lo, hi] (both
// > 0), widened to the nearest labelled ticks so that both ends carry a
// label, with ticks that stay readable from a fraction of a decade to
// many decades.
func logAxis(a *plot.Axis, lo, hi float64) {
	if !(lo > 0) || !(hi >= lo) || !finite(hi) {
		lo, hi = 1, 10
	}
	if hi == lo {
		lo, hi = lo/2, hi*2
	}
	a.Scale = plot.LogScale{}
	a.Min, a.Max = lo, hi
	ticker := logTicks{span: math.Log10(hi / lo)}
	var labelled []float64
	for _, t := range ticker.Ticks(lo/10, hi*10) {
		if t.Label != "" {
			labelled = append(labelled, t.Value)
		}
	}
	for _, v := range labelled {
		if v <= lo*(1+1e-9) {
			a.Min = v
		}
	}
	for i := len(labelled) - 1; i >= 0; i-- {
		if labelled[i] >= hi*(1-1e-9) {
			a.Max = labelled[i]
		}
	}
	a.Tick.Marker = ticker
}

// logTicks labels a logarithmic axis: 1–9 × 10^k over less than one
// decade, 1, 2, 5 × 10^k over up to three decades, and otherwise every
// n-th power of ten with n chosen to give at most seven labels. The span
// in decades that picks the spacing is span, or log10(hi/lo) when span
// is 0.
type logTicks struct{ span float64 }

func (t logTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) || !finite(hi) {
		return nil
	}
	elo := int(math.Floor(math.Log10(lo)))
	ehi := int(math.Ceil(math.Log10(hi)))
	span := t.span
	if span == 0 {
		span = math.Log10(hi / lo)
	}
	var ticks []plot.Tick
	add := func(v float64, label bool) {
		if v < lo*(1-1e-9) || v > hi*(1+1e-9) {
			return
		}
		t := plot.Tick{Value: v}
		if label {
			t.Label = logLabel(v)
		}
		ticks = append(ticks, t)
	}
	step := 1
	if n := int(math.Ceil(span)); n > 7 {
		step = (n + 6) / 7
	}
	for e := elo; e <= ehi; e++ {
		d := math.Pow(10, float64(e))
		switch {
		case span < 1:
			for m := 1; m <= 9; m++ {
				add(float64(m)*d, true)
			}
		case span <= 3:
			for m := 1; m <= 9; m++ {
				add(float64(m)*d, m == 1 || m == 2 || m == 5)
			}
		case step == 1:
			for m := 1; m <= 9; m++ {
				add(float64(m)*d, m == 1)
			}
		default:
			add(d, ((e%step)+step)%step == 0) // same decades whatever the range
		}
	}
	return ticks
}

// logLabel writes v plainly between 0.001 and 99999 and as "2e-7"
// outside that range.
func logLabel(v float64) string {
	if v >= 1e-3 && v < 1e5 {
		return strconv.FormatFloat(v, 'g', 6, 64)
	}
	e := int(math.Floor(math.Log10(v)))
	m := v / math.Pow(10, float64(e))
	return strconv.FormatFloat(m, 'g', 3, 64) + "e" + strconv.Itoa(e)
}

// entry is one legend item.
type entry struct {
	name string
	st   style
	line bool // draw the line in the thumbnail, not only the marker
}

// fig lays out a whole image: a title strip at the top, a legend strip
// at the bottom, and the body in between for the panels.
type fig struct {
	title   string
	entries []entry
}

var (
	titleFont  = font.From(plot.DefaultFont, vg.Points(12))
	legendFont = font.From(plot.DefaultFont, vg.Points(9))
)

// body draws the title and legend on dc and returns the canvas left for
// the panels.
func (f fig) body(dc draw.Canvas) draw.Canvas {
	const pad = vg.Length(4)
	if f.title != "" {
		sty := draw.TextStyle{
			Color:   color.Black,
			Font:    titleFont,
			XAlign:  draw.XCenter,
			YAlign:  draw.YTop,
			Handler: plot.DefaultTextHandler,
		}
		dc.FillText(sty, vg.Point{X: dc.Center().X, Y: dc.Max.Y - pad}, f.title)
		dc.Max.Y -= sty.Height(f.title) + pad
	}
	dc.Max.Y -= pad
	if len(f.entries) > 0 {
		h := f.drawLegend(dc)
		dc.Min.Y += h + pad
	}
	dc.Max.X -= pad
	dc.Min.X += pad
	return dc
}

// drawLegend draws the entries in centred rows at the bottom of dc,
// wrapping as needed, and returns the height used.
func (f fig) drawLegend(dc draw.Canvas) vg.Length {
	sty := draw.TextStyle{
		Color:   color.Black,
		Font:    legendFont,
		XAlign:  draw.XLeft,
		YAlign:  draw.YCenter,
		Handler: plot.DefaultTextHandler,
	}
	const (
		thumb = vg.Length(28) // thumbnail width
		gap   = vg.Length(4)  // between thumbnail and text
		sep   = vg.Length(16) // between entries
		pad   = vg.Length(4)
	)
	rowH := sty.Height("Mg") + 4
	avail := dc.Max.X - dc.Min.X - 2*pad
	width := func(e entry) vg.Length { return thumb + gap + sty.Width(e.name) }
	// Break entries into rows that fit.
	var rows [][]entry
	var cur []entry
	var curW vg.Length
	for _, e := range f.entries {
		w := width(e)
		if len(cur) > 0 && curW+sep+w > avail {
			rows = append(rows, cur)
			cur, curW = nil, 0
		}
		if len(cur) > 0 {
			curW += sep
		}
		cur = append(cur, e)
		curW += w
	}
	rows = append(rows, cur)

	y := dc.Min.Y + pad + vg.Length(len(rows))*rowH - rowH/2
	for _, row := range rows {
		var rw vg.Length
		for i, e := range row {
			if i > 0 {
				rw += sep
			}
			rw += width(e)
		}
		x := dc.Center().X - rw/2
		for _, e := range row {
			if e.line {
				dc.StrokeLine2(e.st.line, x, y, x+thumb, y)
			}
			dc.DrawGlyphNoClip(e.st.glyph, vg.Point{X: x + thumb/2, Y: y})
			dc.FillText(sty, vg.Point{X: x + thumb + gap, Y: y}, e.name)
			x += width(e) + sep
		}
		y -= rowH
	}
	return vg.Length(len(rows))*rowH + 2*pad
}

// drawOwnYLabel draws p on c with the y-axis label set by hand, centred
// on the data area. gonum's plot reserves room for the y label around
// the data value (Min+Max)/2, which on a log axis lies near the top and
// leaves a gap above the data; drawing the label here avoids it. p's own
// y label must be empty.
func drawOwnYLabel(c draw.Canvas, p *plot.Plot, label string) {
	base := p.Y.Label.TextStyle
	sty := base
	sty.Rotation += math.Pi / 2
	h := base.Height(label)
	descent := base.FontExtents().Descent
	inner := c
	inner.Min.X += h + descent + p.Y.Label.Padding
	data := p.DataCanvas(inner)
	c.FillText(sty, vg.Point{X: c.Min.X + h - descent, Y: data.Center().Y}, label)
	p.Draw(inner)
}
