package chart

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// chartCase is one chart drawn on made-up but plausible numbers.
type chartCase struct {
	name  string
	wide  bool
	write func(w io.Writer, f Format) error
}

// decay returns a cost trace c(k) = floor + (c0−floor)·r^k at n points
// spaced by step evaluations.
func decay(n int, step, c0, floor, r float64) (x, y []float64) {
	for k := range n {
		x = append(x, float64(k)*step)
		y = append(y, floor+(c0-floor)*math.Pow(r, float64(k)))
	}
	return x, y
}

func sampleCharts() []chartCase {
	gdX, gdY := decay(200, 1, 1.1, 0.31, 0.985)
	cgX, cgY := decay(60, 2.5, 1.1, 0.3, 0.9)
	lbX, lbY := decay(40, 1.2, 1.1, 0.3, 0.8)
	adX, adY := decay(150, 1, 1.1, 0.305, 0.97)
	sec := func(x []float64, per float64) []float64 {
		out := make([]float64, len(x))
		for i, v := range x {
			out[i] = v * per
		}
		return out
	}
	evals := []Series{{"gd", gdX, gdY}, {"cg", cgX, cgY}, {"lbfgs", lbX, lbY}, {"adam", adX, adY}}
	secs := []Series{{"gd", sec(gdX, 0.002), gdY}, {"cg", sec(cgX, 0.0022), cgY}, {"lbfgs", sec(lbX, 0.003), lbY}, {"adam", sec(adX, 0.0021), adY}}
	return []chartCase{
		{"cost", true, CostPlot{Title: "Cost of four methods on triage", ByEvals: evals, BySeconds: secs}.Write},
		{"cost-relative", true, CostPlot{Title: "Distance to the best cost", ByEvals: evals, BySeconds: secs, Relative: true}.Write},
		{"cost-evals-only", false, CostPlot{Title: "Cost", ByEvals: evals}.Write},
		{"profile", false, func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "Evaluations to reach the target cost on 12 problems", "", []string{"gd", "cg", "lbfgs", "adam"},
				[]float64{1, 1.2, 1.5, 2, 3, 5, 9, 20},
				[][]float64{
					{0, 0, 0, 0.08, 0.25, 0.5, 0.67, 0.75},
					{0.25, 0.42, 0.58, 0.75, 0.83, 0.83, 0.92, 0.92},
					{0.58, 0.67, 0.75, 0.83, 0.92, 1, 1, 1},
					{0.17, 0.25, 0.33, 0.5, 0.58, 0.67, 0.83, 0.92},
				})
		}},
		{"confusion", false, func(w io.Writer, f Format) error {
			return ConfusionPlot(w, f, "Holdout confusion matrix (triage, 300 rows)", []string{"urgent", "soon", "routine", "self-care"},
				[][]int{{52, 6, 1, 0}, {8, 61, 9, 2}, {1, 11, 88, 7}, {0, 1, 9, 44}})
		}},
		{"sweep", false, SweepPlot{
			Title:   "Penalty sweep, 5 folds",
			Lambda:  []float64{0, 1e-4, 1e-3, 1e-2, 1e-1, 1},
			Train:   []float64{0.21, 0.22, 0.25, 0.31, 0.45, 0.72},
			Valid:   []float64{0.52, 0.49, 0.41, 0.36, 0.47, 0.74},
			TrainLo: []float64{0.19, 0.2, 0.23, 0.29, 0.43, 0.7},
			TrainHi: []float64{0.23, 0.24, 0.27, 0.33, 0.47, 0.74},
			ValidLo: []float64{0.44, 0.42, 0.36, 0.32, 0.43, 0.7},
			ValidHi: []float64{0.6, 0.56, 0.46, 0.4, 0.51, 0.78},
		}.Write},
		{"curve", false, CurvePlot{
			Title:   "Learning curve",
			Rows:    []float64{25, 50, 100, 200, 400, 800},
			Train:   []float64{0.08, 0.15, 0.22, 0.27, 0.29, 0.3},
			Holdout: []float64{0.95, 0.7, 0.52, 0.42, 0.37, 0.34},
		}.Write},
	}
}

// TestChartsPNG decodes each chart's PNG and checks its size. The expected
// size is worked by hand from the definition of dots per inch (1 in =
// 2.54 cm): 16 cm × 150/2.54 = 944.9 → 945 px, 28 cm → 1653.5 → 1654 px
// (rounding half up), 10 cm → 590.6 → 591 px.
func TestChartsPNG(t *testing.T) {
	out := os.Getenv("CHART_OUT") // set to a directory to keep the images for a look
	for _, c := range append(sampleCharts(), decisionCharts()...) {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			require.NoError(t, c.write(&buf, PNG))
			if out != "" {
				require.NoError(t, os.WriteFile(filepath.Join(out, c.name+".png"), buf.Bytes(), 0o644))
			}
			img, err := png.Decode(&buf)
			require.NoError(t, err, "decoding the PNG")
			wantW, wantH := 945, 591
			if c.wide {
				wantW = 1654
			}
			b := img.Bounds()
			assert.Equal(t, wantW, b.Dx(), "width in px")
			assert.Equal(t, wantH, b.Dy(), "height in px")
		})
	}
}

// TestChartsSVG checks each chart's SVG against the XML 1.0 grammar (as
// encoding/xml reads it) and the SVG 1.1 rule that the document element
// is <svg>, so that it can be inlined in HTML; and that each carries the
// texts decisionText lists for it.
func TestChartsSVG(t *testing.T) {
	for _, c := range append(sampleCharts(), decisionCharts()...) {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			require.NoError(t, c.write(&buf, SVG))
			s := buf.String()
			require.True(t, strings.HasPrefix(s, "<?xml") || strings.HasPrefix(s, "<svg"), "starts with %q, want an XML or <svg header", s[:min(len(s), 20)])
			d := xml.NewDecoder(strings.NewReader(s))
			root := ""
			for {
				tok, err := d.Token()
				if err == io.EOF {
					break
				}
				require.NoError(t, err, "not well-formed XML")
				if se, ok := tok.(xml.StartElement); ok && root == "" {
					root = se.Name.Local
				}
			}
			assert.Equal(t, "svg", root, "root element")
			for _, w := range decisionText[c.name] {
				// strings.Contains rather than assert.Contains: a
				// failure need not print the whole SVG.
				assert.True(t, strings.Contains(s, w), "SVG lacks the text %q", w)
			}
		})
	}
}

func TestFormatOf(t *testing.T) {
	tests := []struct {
		path string
		want Format
		err  error
	}{
		{"out/cost.png", PNG, nil},
		{"COST.PNG", PNG, nil},
		{"a.b/profile.svg", SVG, nil},
		{"cost.pdf", 0, ErrFormat},
		{"cost", 0, ErrFormat},
		{"png", 0, ErrFormat},
	}
	for _, tt := range tests {
		t.Run(tt.path, func(t *testing.T) {
			got, err := FormatOf(tt.path)
			require.ErrorIs(t, err, tt.err)
			if err == nil {
				assert.Equal(t, tt.want, got, "FormatOf(%q)", tt.path)
			}
		})
	}
}

func TestBadInput(t *testing.T) {
	one := []Series{{"gd", []float64{0, 1}, []float64{1, 0.5}}}
	tests := []struct {
		name  string
		write func(w io.Writer, f Format) error
		f     Format
		want  error
	}{
		{"unknown format", CostPlot{ByEvals: one}.Write, Format(7), ErrFormat},
		{"cost no series", CostPlot{}.Write, PNG, ErrEmpty},
		{"cost empty series", CostPlot{ByEvals: []Series{{Name: "gd"}}}.Write, PNG, ErrEmpty},
		{"cost mismatched", CostPlot{BySeconds: []Series{{"gd", []float64{1, 2}, []float64{1}}}}.Write, PNG, ErrLength},
		{"cost nothing positive", CostPlot{ByEvals: []Series{{"gd", []float64{1, 2}, []float64{0, -1}}}}.Write, PNG, ErrEmpty},
		{"profile no solvers", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", nil, []float64{1}, nil)
		}, PNG, ErrEmpty},
		{"profile rho rows", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", []string{"a", "b"}, []float64{1}, [][]float64{{1}})
		}, PNG, ErrLength},
		{"profile rho length", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", []string{"a"}, []float64{1, 2}, [][]float64{{1}})
		}, PNG, ErrLength},
		{"profile tau below 1", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", []string{"a"}, []float64{0.5}, [][]float64{{1}})
		}, PNG, ErrValue},
		{"profile tau unsorted", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", []string{"a"}, []float64{1, 3, 2}, [][]float64{{0, 0.5, 1}})
		}, PNG, ErrValue},
		{"profile rho above 1", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", []string{"a"}, []float64{1}, [][]float64{{1.5}})
		}, PNG, ErrValue},
		{"confusion no classes", func(w io.Writer, f Format) error {
			return ConfusionPlot(w, f, "", nil, nil)
		}, PNG, ErrEmpty},
		{"confusion not square", func(w io.Writer, f Format) error {
			return ConfusionPlot(w, f, "", []string{"a", "b"}, [][]int{{1, 2}, {3}})
		}, PNG, ErrLength},
		{"confusion rows", func(w io.Writer, f Format) error {
			return ConfusionPlot(w, f, "", []string{"a", "b"}, [][]int{{1, 2}})
		}, PNG, ErrLength},
		{"confusion negative", func(w io.Writer, f Format) error {
			return ConfusionPlot(w, f, "", []string{"a"}, [][]int{{-1}})
		}, SVG, ErrValue},
		{"sweep no lambda", SweepPlot{Train: []float64{1}}.Write, PNG, ErrEmpty},
		{"sweep no values", SweepPlot{Lambda: []float64{1}}.Write, PNG, ErrEmpty},
		{"sweep mismatched", SweepPlot{Lambda: []float64{0, 1}, Valid: []float64{1}}.Write, PNG, ErrLength},
		{"sweep half spread", SweepPlot{Lambda: []float64{1}, Train: []float64{1}, TrainLo: []float64{0.5}}.Write, PNG, ErrLength},
		{"sweep negative lambda", SweepPlot{Lambda: []float64{-1}, Train: []float64{1}}.Write, PNG, ErrValue},
		{"curve no rows", CurvePlot{Train: []float64{1}}.Write, PNG, ErrEmpty},
		{"curve mismatched", CurvePlot{Rows: []float64{10, 20}, Holdout: []float64{1}}.Write, PNG, ErrLength},
		{"curve all NaN", CurvePlot{Rows: []float64{10}, Train: []float64{math.NaN()}}.Write, PNG, ErrEmpty},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var buf bytes.Buffer
			err := tt.write(&buf, tt.f)
			require.ErrorIs(t, err, tt.want)
			assert.Equal(t, 0, buf.Len(), "bytes written on error")
		})
	}
}
