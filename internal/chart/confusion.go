package chart

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ConfusionPlot draws a confusion matrix as a heat map: row i is the true
// class classes[i], column j the predicted class, and the cell holds
// counts[i][j], the number of rows of class i the model assigned to
// class j. Cells are shaded by the share of the true class's rows,
// counts[i][j] / Σ_j counts[i][j], from white (0) to dark blue (1), a
// ramp whose lightness falls steadily so it reads the same in grey; a
// scale at the right gives the shares. The count is written in each
// cell, in white on dark cells. The first class is at the top. The image
// is Width × Height.
//
// classes must be non-empty and counts square with one row and column
// per class, with no negative counts; otherwise the error wraps
// ErrEmpty, ErrLength or ErrValue.
func ConfusionPlot(w io.Writer, f Format, title string, classes []string, counts [][]int) error {
	n := len(classes)
	if n == 0 {
		return fmt.Errorf("chart: confusion: no classes: %w", ErrEmpty)
	}
	if len(counts) != n {
		return fmt.Errorf("chart: confusion: %d rows for %d classes: %w", len(counts), n, ErrLength)
	}
	share := make([][]float64, n)
	for i, row := range counts {
		if len(row) != n {
			return fmt.Errorf("chart: confusion: row %d has %d columns for %d classes: %w", i, len(row), n, ErrLength)
		}
		total := 0
		for j, c := range row {
			if c < 0 {
				return fmt.Errorf("chart: confusion: count[%d][%d] = %d: %w", i, j, c, ErrValue)
			}
			total += c
		}
		share[i] = make([]float64, n)
		for j, c := range row {
			if total > 0 {
				share[i][j] = float64(c) / float64(total)
			}
		}
	}

	ramp := blues(64)
	// Main panel: grid column j at x = j, row i at y = n−1−i.
	p := newPlot("", "predicted class", "true class")
	p.Add(&heatMap{cols: n, rows: n, z: func(c, r int) float64 { return share[n-1-r][c] }, ramp: ramp})
	fontSize := vg.Points(math.Max(6, math.Min(10, 80/float64(n))))
	var xys plotter.XYs
	var labels []string
	var styles []text.Style
	for i := range n {
		for j := range n {
			xys = append(xys, plotter.XY{X: float64(j), Y: float64(n - 1 - i)})
			labels = append(labels, strconv.Itoa(counts[i][j]))
			sty := text.Style{
				Color:   color.Black,
				Font:    legendFont,
				XAlign:  draw.XCenter,
				YAlign:  draw.YCenter,
				Handler: plot.DefaultTextHandler,
			}
			sty.Font.Size = fontSize
			if share[i][j] > 0.5 {
				sty.Color = color.White
			}
			styles = append(styles, sty)
		}
	}
	lb, err := plotter.NewLabels(plotter.XYLabels{XYs: xys, Labels: labels})
	if err != nil {
		return fmt.Errorf("chart: %w", err)
	}
	lb.TextStyle = styles
	p.Add(lb)
	p.NominalX(classes...)
	rev := make([]string, n)
	for i, c := range classes {
		rev[n-1-i] = c
	}
	p.NominalY(rev...)
	p.X.Padding, p.Y.Padding = 0, 0
	p.X.Min, p.X.Max = -0.5, float64(n)-0.5
	p.Y.Min, p.Y.Max = -0.5, float64(n)-0.5
	long := 0
	for _, c := range classes {
		long = max(long, len([]rune(c)))
	}
	if long*n > 60 {
		p.X.Tick.Label.Rotation = math.Pi / 4
		p.X.Tick.Label.XAlign = draw.XRight
		p.X.Tick.Label.YAlign = draw.YTop
	}

	// Scale panel: a single column of the ramp against the share.
	const steps = 50
	sc := newPlot("", "", "share of the true class's rows")
	sc.Add(&heatMap{cols: 1, rows: steps, y0: 0.5 / steps, dy: 1.0 / steps,
		z: func(_, r int) float64 { return (float64(r) + 0.5) / steps }, ramp: ramp})
	sc.HideX()
	sc.Y.Padding = 0
	sc.Y.Min, sc.Y.Max = 0, 1
	sc.Y.Tick.Marker = plot.ConstantTicks{
		{Value: 0, Label: "0"}, {Value: 0.25, Label: "0.25"}, {Value: 0.5, Label: "0.5"},
		{Value: 0.75, Label: "0.75"}, {Value: 1, Label: "1"},
	}

	fg := fig{title: title}
	return render(w, f, Width, Height, func(dc draw.Canvas) error {
		body := fg.body(dc)
		scaleW := 2.4 * vg.Centimeter
		main := body
		main.Max.X -= scaleW + 0.6*vg.Centimeter
		p.Draw(main)
		// Align the scale with the main panel's data area vertically.
		data := p.DataCanvas(main)
		side := body
		side.Min.X = body.Max.X - scaleW
		side.Min.Y = data.Min.Y
		side.Max.Y = data.Max.Y
		sc.Draw(side)
		return nil
	})
}

// heatMap fills a regular grid of unit cells: cell (c, r) is centred at
// (c, y0 + r·dy) (dy = 1 when zero) and coloured by z(c, r) ∈ [0, 1].
type heatMap struct {
	cols, rows int
	y0, dy     float64
	z          func(c, r int) float64
	ramp       []color.Color
}

func (h *heatMap) step() float64 {
	if h.dy == 0 {
		return 1
	}
	return h.dy
}

// Plot implements plot.Plotter.
func (h *heatMap) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	dy := h.step()
	for col := range h.cols {
		for r := range h.rows {
			v := h.z(col, r)
			k := int(math.Round(v * float64(len(h.ramp)-1)))
			k = max(0, min(len(h.ramp)-1, k))
			x0, x1 := trX(float64(col)-0.5), trX(float64(col)+0.5)
			yc := h.y0 + float64(r)*dy
			y0, y1 := trY(yc-dy/2), trY(yc+dy/2)
			pts := []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}
			c.FillPolygon(h.ramp[k], c.ClipPolygonXY(pts))
		}
	}
}

// DataRange implements plot.DataRanger.
func (h *heatMap) DataRange() (xmin, xmax, ymin, ymax float64) {
	dy := h.step()
	return -0.5, float64(h.cols) - 0.5, h.y0 - dy/2, h.y0 + (float64(h.rows)-0.5)*dy
}

// blues returns n colours from white to dark blue, interpolated linearly
// in sRGB between white, a mid blue and a dark blue; each channel falls
// monotonically, so the grey level falls monotonically too.
func blues(n int) []color.Color {
	stops := [][3]float64{{255, 255, 255}, {107, 174, 214}, {8, 48, 107}}
	out := make([]color.Color, n)
	for k := range n {
		t := float64(k) / float64(n-1) * float64(len(stops)-1)
		i := min(int(t), len(stops)-2)
		u := t - float64(i)
		var rgb [3]uint8
		for ch := range 3 {
			rgb[ch] = uint8(math.Round(stops[i][ch]*(1-u) + stops[i+1][ch]*u))
		}
		out[k] = color.RGBA{rgb[0], rgb[1], rgb[2], 0xFF}
	}
	return out
}
