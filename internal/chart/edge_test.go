package chart

import (
	"bytes"
	"fmt"
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

// TestEdgeCases draws charts on degenerate but valid input; each must
// give a decodable PNG rather than an error or a panic.
func TestEdgeCases(t *testing.T) {
	cases := []struct {
		name  string
		write func(w io.Writer, f Format) error
	}{
		{"cost one point", CostPlot{ByEvals: []Series{{"gd", []float64{0}, []float64{1}}}}.Write},
		{"cost relative all equal", CostPlot{Relative: true, ByEvals: []Series{{"gd", []float64{0, 1}, []float64{2, 2}}}}.Write},
		{"cost twelve decades, NaN and zero dropped", CostPlot{ByEvals: []Series{{"gd", []float64{0, 1, 2, 3, 4}, []float64{1e3, math.NaN(), 1e-9, 0, 1e-12}}}}.Write},
		{"cost nine methods", CostPlot{ByEvals: func() []Series {
			var s []Series
			for i := range 9 {
				s = append(s, Series{fmt.Sprint("method-", i), []float64{0, 1}, []float64{1, 1 / float64(i+2)}})
			}
			return s
		}()}.Write},
		{"profile single breakpoint", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", []string{"a", "b"}, []float64{1}, [][]float64{{1}, {0}})
		}},
		{"profile wide ratios", func(w io.Writer, f Format) error {
			return ProfilePlot(w, f, "", "", []string{"a"}, []float64{1, 1e4}, [][]float64{{0.5, 1}})
		}},
		{"confusion empty row", func(w io.Writer, f Format) error {
			return ConfusionPlot(w, f, "", []string{"a", "b"}, [][]int{{3, 1}, {0, 0}})
		}},
		{"confusion many long names", func(w io.Writer, f Format) error {
			n := 12
			names := make([]string, n)
			counts := make([][]int, n)
			for i := range n {
				names[i] = fmt.Sprint("class-number-", i)
				counts[i] = make([]int, n)
				counts[i][i] = 10 + i
				counts[i][(i+1)%n] = 2
			}
			return ConfusionPlot(w, f, "", names, counts)
		}},
		{"sweep only zero", SweepPlot{Lambda: []float64{0}, Train: []float64{0.4}}.Write},
		{"sweep no zero", SweepPlot{Lambda: []float64{1e-3, 1e-1}, Valid: []float64{0.4, 0.3}}.Write},
		{"sweep one positive", SweepPlot{Lambda: []float64{0, 0.5}, Train: []float64{0.4, 0.3}}.Write},
		{"curve one point", CurvePlot{Rows: []float64{50}, Holdout: []float64{0.7}}.Write},
		{"roc one point", ROCPlot{Curves: []Series{{"a", []float64{0}, []float64{0}}}}.Write},
		{"roc NaN rates", ROCPlot{Curves: []Series{{"a", []float64{0, math.NaN(), 1}, []float64{0, 0.5, 1}}}}.Write},
		{"pr one point", PRPlot{Curves: []Series{{"a", []float64{1}, []float64{0.03}}}, Marks: []Mark{{X: 1, Y: 0.03}}}.Write},
		{"reliability 1 bin", ReliabilityPlot{Count: []int{5}, Accuracy: []float64{1}, Confidence: []float64{1}}.Write},
		{"reliability 40 bin", func(w io.Writer, f Format) error {
			r := ReliabilityPlot{Count: make([]int, 40), Accuracy: make([]float64, 40), Confidence: make([]float64, 40)}
			for b := range 40 {
				r.Count[b] = 1000 + b
				r.Accuracy[b] = float64(b) / 40
				r.Confidence[b] = (float64(b) + 0.5) / 40
			}
			return r.Write(w, f)
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			require.NoError(t, c.write(&buf, PNG))
			if out := os.Getenv("CHART_OUT"); out != "" { // for a look
				name := strings.ReplaceAll(c.name, " ", "-") + ".png"
				require.NoError(t, os.WriteFile(filepath.Join(out, name), buf.Bytes(), 0o644))
			}
			_, err := png.Decode(&buf)
			assert.NoError(t, err, "decoding the PNG")
		})
	}
}

// TestLogTicks checks that log axes carry at least two and at most
// seven labels over spans from a fraction of a decade to twelve decades,
// and that labels are short (no float noise such as 0.7000000000000001).
func TestLogTicks(t *testing.T) {
	tests := []struct{ lo, hi float64 }{
		{0.3, 1.1}, {2, 5}, {1e-3, 0.5}, {1e-12, 1e3}, {7e-7, 3e-6}, {1, 1e30},
	}
	for _, tt := range tests {
		t.Run(fmt.Sprint(tt.lo, "-", tt.hi), func(t *testing.T) {
			var labels []string
			for _, tk := range (logTicks{}).Ticks(tt.lo, tt.hi) {
				assert.GreaterOrEqual(t, tk.Value, tt.lo*(1-1e-9), "tick %g outside [%g, %g]", tk.Value, tt.lo, tt.hi)
				assert.LessOrEqual(t, tk.Value, tt.hi*(1+1e-9), "tick %g outside [%g, %g]", tk.Value, tt.lo, tt.hi)
				if tk.Label != "" {
					labels = append(labels, tk.Label)
				}
			}
			// Span < 1 decade labels up to 9 per decade, so allow 9 there.
			assert.GreaterOrEqual(t, len(labels), 2, "labels %v: want 2 to 9", labels)
			assert.LessOrEqual(t, len(labels), 9, "labels %v: want 2 to 9", labels)
			for _, l := range labels {
				assert.LessOrEqual(t, len(l), 6, "label %q longer than 6 characters", l)
			}
		})
	}
}

func ExampleFormatOf() {
	for _, name := range []string{"cost.png", "profile.SVG", "sweep.pdf"} {
		f, err := FormatOf(name)
		if err != nil {
			fmt.Println(name, "error")
			continue
		}
		fmt.Println(name, f)
	}
	// Output:
	// cost.png png
	// profile.SVG svg
	// sweep.pdf error
}

func ExampleCurvePlot_Write() {
	var buf bytes.Buffer
	err := CurvePlot{
		Title:   "Learning curve",
		Rows:    []float64{50, 100, 200},
		Train:   []float64{0.2, 0.25, 0.28},
		Holdout: []float64{0.6, 0.45, 0.38},
	}.Write(&buf, SVG)
	fmt.Println(err, strings.Contains(buf.String(), "<svg"))
	// Output:
	// <nil> true
}
