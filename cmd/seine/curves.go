package main

import (
	"fmt"
	"io"
	"math"

	"github.com/seine-ml/seine/internal/chart"
	"github.com/seine-ml/seine/score"
)

// curveClasses returns the classes whose one-vs-rest curves are drawn: the
// second class of a binary single-label report (the first one's curves
// mirror it), else every class that has both positive and negative rows.
func curveClasses(r *score.Report) []int {
	if !r.Multilabel && len(r.Classes) == 2 {
		return []int{1}
	}
	var ks []int
	for k, c := range r.Ranking.PerClass {
		if c.Positives > 0 && c.Negatives > 0 {
			ks = append(ks, k)
		}
	}
	return ks
}

// operatingPoint returns the false positive rate, recall and precision of
// class k's decisions in r (by the operating threshold, or the most
// probable class), from its counts.
func operatingPoint(r *score.Report, k int) (fpr, tpr, precision float64) {
	c := r.PerClass[k]
	tp := math.Round(c.Recall * float64(c.Rows))
	neg := float64(r.Rows - c.Rows)
	if neg > 0 {
		fpr = (float64(c.Predicted) - tp) / neg
	}
	return fpr, c.Recall, c.Precision
}

// rocPlot is the ROC chart of r, with each class's operating point marked.
func rocPlot(r *score.Report, title string) *chart.ROCPlot {
	p := &chart.ROCPlot{Title: title}
	for i, k := range curveClasses(r) {
		rk := r.Ranking.PerClass[k]
		p.Curves = append(p.Curves, chart.Series{Name: fmt.Sprintf("%s (area %.3f)", r.Classes[k], rk.ROCAUC), X: rk.ROC.FPR, Y: rk.ROC.TPR})
		fpr, tpr, _ := operatingPoint(r, k)
		p.Marks = append(p.Marks, chart.Mark{Curve: i, X: fpr, Y: tpr, Label: markLabel(r, k)})
	}
	return p
}

// prPlot is the precision–recall chart of r, with each class's operating
// point marked and its share of positive rows as the baseline.
func prPlot(r *score.Report, title string) *chart.PRPlot {
	p := &chart.PRPlot{Title: title}
	for i, k := range curveClasses(r) {
		rk := r.Ranking.PerClass[k]
		p.Curves = append(p.Curves, chart.Series{Name: fmt.Sprintf("%s (AP %.3f)", r.Classes[k], rk.AveragePrecision), X: rk.PR.Recall, Y: rk.PR.Precision})
		p.Baseline = append(p.Baseline, float64(rk.Positives)/float64(rk.Positives+rk.Negatives))
		_, tpr, prec := operatingPoint(r, k)
		p.Marks = append(p.Marks, chart.Mark{Curve: i, X: tpr, Y: prec, Label: markLabel(r, k)})
	}
	return p
}

func markLabel(r *score.Report, k int) string {
	if t := r.PerClass[k].Threshold; t != nil {
		return fmt.Sprintf("t = %.3g", *t)
	}
	return "most probable"
}

// reliabilityPlot is the reliability diagram of r.
func reliabilityPlot(r *score.Report, title string) *chart.ReliabilityPlot {
	p := &chart.ReliabilityPlot{Title: fmt.Sprintf("%s (ECE %.3f)", title, r.ECE)}
	for _, b := range r.Reliability.Bins {
		p.Count = append(p.Count, b.Count)
		p.Accuracy = append(p.Accuracy, b.Accuracy)
		p.Confidence = append(p.Confidence, b.Confidence)
	}
	return p
}

// chartWriter is any of the charts above.
type chartWriter interface {
	Write(w io.Writer, f chart.Format) error
}
