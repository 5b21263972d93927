package score

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Bins is the number of equal-width bins of the reliability diagram.
const Bins = 10

// Bin is one bin of a reliability diagram: the items whose confidence c
// satisfies Lo < c ≤ Hi (the first bin also takes c = 0).
type Bin struct {
	Lo, Hi float64
	// Count is the number of items in the bin.
	Count int
	// Accuracy is the share of the bin's items whose outcome is right:
	// for single-label data the predicted class is the true class, for
	// multi-label data the row carries the class. NaN when Count is 0.
	Accuracy float64
	// Confidence is the mean confidence of the bin's items; NaN when
	// Count is 0.
	Confidence float64
}

// Reliability is a reliability diagram and its expected calibration
// error.
type Reliability struct {
	Bins []Bin // Bins bins, from [0, 0.1] up to (0.9, 1]
	// Items is N, the number of items binned: the rows for single-label
	// data, rows × classes for multi-label data.
	Items int
	// ECE is the expected calibration error Σ_b (n_b/N)·|acc_b − conf_b|.
	ECE float64
}

// binOf returns the bin of a confidence c in [0, 1]: bin b holds
// e_b < c ≤ e_{b+1}, where e_b is the float64 nearest to b/10, compared
// exactly; c = 0 goes to bin 0. So a probability written as 0.3 lands in
// (0.2, 0.3], as it would on paper, though 10 × 0.3 rounds above 3 in
// float64.
func binOf(c float64) int {
	b := int(math.Ceil(c*Bins)) - 1
	b = max(0, min(Bins-1, b))
	for b > 0 && c <= float64(b)/Bins {
		b--
	}
	for b < Bins-1 && c > float64(b+1)/Bins {
		b++
	}
	return b
}

// ReliabilityDiagram bins the predictions in p against the truth in y
// (both m × K) into Bins equal-width bins of confidence and returns the
// count, accuracy and mean confidence per bin and the expected
// calibration error (Guo, Pleiss, Sun & Weinberger 2017, "On calibration
// of modern neural networks", ICML):
//
//	ECE = Σ_b (n_b/N)·|acc_b − conf_b|.
//
// Single-label data (softmax, or the two columns [1−p, p] of a binary
// sigmoid model): one item per row, the confidence is the probability of
// the predicted class, maxₖ Pᵢₖ (the first column on a tie, as in
// Evaluate), and the item is right when that class is the row's true
// class (the arg-max of its row of y).
//
// Multi-label data: one item per row and class, the confidence is Pᵢₖ
// itself and the item is right when Yᵢₖ > 0.5, so each bin compares the
// mean predicted probability with the observed frequency of the class —
// the reliability diagram of a probability forecast (Murphy & Winkler
// 1977) — over all K units pooled. Binning max(Pᵢₖ, 1−Pᵢₖ) instead would
// use only the upper five bins and hide which side a unit errs on.
//
// Bin b (b = 0 … 9) holds confidences in (b/10, (b+1)/10], the edges
// being the float64 values nearest b/10 compared exactly, and bin 0 also
// holds 0. classes names the columns. Errors wrap ErrShape or ErrValue (a
// probability outside [0, 1], with its row and class).
func ReliabilityDiagram(p, y mat.Matrix, classes []string, multilabel bool) (*Reliability, error) {
	m, k, err := checkProbs(p, y, classes)
	if err != nil {
		return nil, err
	}
	var count [Bins]int
	var right, conf [Bins]float64
	add := func(c float64, ok bool) {
		b := binOf(c)
		count[b]++
		conf[b] += c
		if ok {
			right[b]++
		}
	}
	n := 0
	for i := 0; i < m; i++ {
		if multilabel {
			for j := 0; j < k; j++ {
				add(p.At(i, j), y.At(i, j) > 0.5)
				n++
			}
			continue
		}
		pred := argmaxRow(p, i, k)
		add(p.At(i, pred), pred == argmaxRow(y, i, k))
		n++
	}
	r := &Reliability{Bins: make([]Bin, Bins), Items: n}
	for b := range r.Bins {
		bin := Bin{Lo: float64(b) / Bins, Hi: float64(b+1) / Bins, Count: count[b],
			Accuracy: math.NaN(), Confidence: math.NaN()}
		if count[b] > 0 {
			bin.Accuracy = right[b] / float64(count[b])
			bin.Confidence = conf[b] / float64(count[b])
			r.ECE += float64(count[b]) / float64(n) * math.Abs(bin.Accuracy-bin.Confidence)
		}
		r.Bins[b] = bin
	}
	return r, nil
}
