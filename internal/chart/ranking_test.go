package chart

import (
	"bytes"
	"io"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// rocSample is a made-up but plausible ROC curve, a binormal model
// TPR = Φ(a + Φ⁻¹(FPR)) with a = 1.5 (common practice for smooth ROC
// curves), at 41 points.
func rocSample(a float64) (fpr, tpr []float64) {
	for i := range 41 {
		x := float64(i) / 40
		fpr = append(fpr, x)
		switch i {
		case 0:
			tpr = append(tpr, 0)
		case 40:
			tpr = append(tpr, 1)
		default:
			z := math.Sqrt2 * math.Erfinv(2*x-1)
			tpr = append(tpr, 0.5*math.Erfc(-(a+z)/math.Sqrt2))
		}
	}
	return fpr, tpr
}

func decisionCharts() []chartCase {
	f1, t1 := rocSample(1.5)
	f2, t2 := rocSample(0.6)
	// A precision–recall staircase of 12 positives among 400 rows.
	rec := []float64{1.0 / 12, 2.0 / 12, 3.0 / 12, 4.0 / 12, 4.0 / 12, 5.0 / 12, 6.0 / 12, 7.0 / 12, 8.0 / 12, 9.0 / 12, 10.0 / 12, 11.0 / 12, 1}
	prec := []float64{1, 1, 1, 0.8, 4.0 / 6, 5.0 / 8, 6.0 / 11, 7.0 / 15, 8.0 / 22, 9.0 / 40, 10.0 / 90, 11.0 / 200, 12.0 / 400}
	return []chartCase{
		{"roc", false, ROCPlot{
			Title:  "ROC curves, holdout (one class against the rest)",
			Curves: []Series{{Name: "fraud (AUC 0.86)", X: f1, Y: t1}, {Name: "chargeback (AUC 0.66)", X: f2, Y: t2}},
			Marks:  []Mark{{Curve: 0, X: f1[8], Y: t1[8], Label: "t = 0.42"}},
		}.Write},
		{"pr", false, PRPlot{
			Title:    "Precision–recall, holdout",
			Curves:   []Series{{Name: "fraud (AP 0.62)", X: rec, Y: prec}},
			Baseline: []float64{12.0 / 400},
			Marks:    []Mark{{Curve: 0, X: rec[6], Y: prec[6], Label: "t = 0.42"}},
		}.Write},
		{"reliability", false, ReliabilityPlot{
			Title:      "Reliability, holdout (ECE 0.071)",
			Count:      []int{3, 0, 4, 9, 12, 20, 31, 45, 88, 160},
			Accuracy:   []float64{0, math.NaN(), 0.25, 0.33, 0.42, 0.45, 0.55, 0.6, 0.74, 0.93},
			Confidence: []float64{0.07, math.NaN(), 0.26, 0.36, 0.45, 0.55, 0.65, 0.76, 0.86, 0.97},
		}.Write},
	}
}

// decisionText lists, for each chart of decisionCharts, texts a reader
// needs (the operating point's label, every bin count) that its SVG must
// carry as text; TestChartsSVG checks them.
var decisionText = map[string][]string{
	"roc":         {"t = 0.42", "operating point", "chance"},
	"pr":          {"t = 0.42", "fraud (AP 0.62)", "share of positives"},
	"reliability": {">3<", ">0<", ">4<", ">9<", ">12<", ">20<", ">31<", ">45<", ">88<", ">160<", "perfect calibration"},
}

func TestDecisionChartsBadInput(t *testing.T) {
	one := []Series{{"a", []float64{0, 1}, []float64{0, 1}}}
	rel := func(c []int, a, p []float64) func(io.Writer, Format) error {
		return ReliabilityPlot{Count: c, Accuracy: a, Confidence: p}.Write
	}
	tests := []struct {
		name  string
		write func(w io.Writer, f Format) error
		want  error
	}{
		{"roc no curves", ROCPlot{}.Write, ErrEmpty},
		{"roc empty curve", ROCPlot{Curves: []Series{{Name: "a"}}}.Write, ErrEmpty},
		{"roc mismatched", ROCPlot{Curves: []Series{{"a", []float64{0, 1}, []float64{0}}}}.Write, ErrLength},
		{"roc rate above 1", ROCPlot{Curves: []Series{{"a", []float64{0, 1.5}, []float64{0, 1}}}}.Write, ErrValue},
		{"roc all NaN", ROCPlot{Curves: []Series{{"a", []float64{math.NaN()}, []float64{0}}}}.Write, ErrEmpty},
		{"roc mark on no curve", ROCPlot{Curves: one, Marks: []Mark{{Curve: 1, X: 0.5, Y: 0.5}}}.Write, ErrValue},
		{"roc mark outside", ROCPlot{Curves: one, Marks: []Mark{{X: -0.1, Y: 0.5}}}.Write, ErrValue},
		{"pr baselines", PRPlot{Curves: one, Baseline: []float64{0.1, 0.2}}.Write, ErrLength},
		{"pr baseline above 1", PRPlot{Curves: one, Baseline: []float64{2}}.Write, ErrValue},
		{"reliability no bins", rel(nil, nil, nil), ErrEmpty},
		{"reliability lengths", rel([]int{1, 2}, []float64{0.5}, []float64{0.5, 0.5}), ErrLength},
		{"reliability negative count", rel([]int{-1}, []float64{0.5}, []float64{0.5}), ErrValue},
		{"reliability NaN in a full bin", rel([]int{1}, []float64{math.NaN()}, []float64{0.5}), ErrValue},
		{"reliability all empty", rel([]int{0, 0}, []float64{math.NaN(), math.NaN()}, []float64{math.NaN(), math.NaN()}), ErrEmpty},
		{"unknown format", ROCPlot{Curves: one}.Write, ErrFormat},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f := PNG
			if tt.want == ErrFormat {
				f = Format(9)
			}
			var buf bytes.Buffer
			err := tt.write(&buf, f)
			require.ErrorIs(t, err, tt.want)
			assert.Equal(t, 0, buf.Len(), "bytes written on error")
		})
	}
}
