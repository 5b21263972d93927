package score

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Class holds the scores of one class.
type Class struct {
	Name      string  `json:"class"`
	Rows      int     `json:"rows"`      // rows that truly carry the class
	Predicted int     `json:"predicted"` // rows the model assigned to it
	Precision float64 `json:"precision"`
	Recall    float64 `json:"recall"`
	F1        float64 `json:"f1"`
	// ROCAUC and AveragePrecision rank the rows by the class's probability,
	// one-vs-rest (see ROCArea and AveragePrecision); nil (JSON null) when
	// the rows hold no positive or no negative of the class.
	ROCAUC           *float64 `json:"roc_auc"`
	AveragePrecision *float64 `json:"average_precision"`
	// Threshold is the probability at or above which the class is decided
	// (sigmoid outputs: multi-label, and class 1 of a binary model); nil
	// where the decision is the most probable class.
	Threshold *float64 `json:"threshold,omitempty"`
}

// Report is the fit of predictions to a data set.
type Report struct {
	Rows         int      `json:"rows"`
	Accuracy     float64  `json:"accuracy"` // exact-set match rate for multi-label data
	CrossEntropy float64  `json:"cross_entropy"`
	MacroF1      float64  `json:"macro_f1"`
	Classes      []string `json:"classes"`
	Confusion    [][]int  `json:"confusion,omitempty"`    // single-label: [true][predicted]
	HammingLoss  *float64 `json:"hamming_loss,omitempty"` // multi-label only
	PerClass     []Class  `json:"per_class"`
	Multilabel   bool     `json:"multilabel"`
	Threshold    float64  `json:"threshold,omitempty"` // multi-label decision threshold when every class has the same one
	// MacroROCAUC and MacroAveragePrecision are the means over the classes
	// that have both positive and negative rows; nil when none has.
	MacroROCAUC           *float64 `json:"macro_roc_auc"`
	MacroAveragePrecision *float64 `json:"macro_average_precision"`
	// ECE is the expected calibration error of ReliabilityDiagram (Guo et
	// al. 2017) over 10 equal-width bins.
	ECE float64 `json:"ece"`
	// Ranking and Reliability hold the curves and bins behind the figures
	// above, for plots; they are not written as JSON.
	Ranking     *Rankings    `json:"-"`
	Reliability *Reliability `json:"-"`
	// Warnings say where these figures mislead (see Warnings); the caller
	// fills them in.
	Warnings []string `json:"warnings,omitempty"`
}

// Options set how predictions are turned into decisions.
type Options struct {
	// Multilabel scores each class as its own yes/no question.
	Multilabel bool
	// Threshold is the probability at or above which a multi-label class is
	// decided present; 0 means 0.5.
	Threshold float64
	// Thresholds, when set, are per-class operating thresholds: one per
	// class for multi-label data (replacing Threshold), or one for a
	// binary single-label model, applied to the probability of class 1
	// (row decided as class 1 when p₁ ≥ t). Single-label models with more
	// than two classes always take the most probable class.
	Thresholds []float64
}

const floor = 1e-300

// Evaluate scores the probabilities p against the targets y. classes names
// the K columns. Rows are decided by opt (the most probable class, or the
// thresholds of opt.Threshold and opt.Thresholds); besides the decision
// figures it fills in the one-vs-rest ranking figures of Rank and the
// expected calibration error of ReliabilityDiagram, keeping their curves
// and bins in Ranking and Reliability. It returns an error when the shapes
// disagree, a threshold is outside [0, 1] or a value is not a probability.
func Evaluate(p, y mat.Matrix, classes []string, opt Options) (*Report, error) {
	m, k := p.Dims()
	ym, yk := y.Dims()
	if m != ym || k != yk || k != len(classes) {
		return nil, fmt.Errorf("score: probabilities are %d×%d, targets %d×%d, %d class names", m, k, ym, yk, len(classes))
	}
	if m == 0 {
		return nil, fmt.Errorf("score: no rows")
	}
	th := opt.Threshold
	if th == 0 {
		th = 0.5
	}
	if th < 0 || th > 1 || math.IsNaN(th) {
		return nil, fmt.Errorf("score: threshold %v is outside [0, 1]", th)
	}
	thr := make([]float64, k) // multi-label decision thresholds
	for j := range thr {
		thr[j] = th
	}
	binary := -1.0 // single-label binary threshold on class 1; < 0: none
	switch {
	case opt.Thresholds == nil:
	case opt.Multilabel && len(opt.Thresholds) == k:
		copy(thr, opt.Thresholds)
	case !opt.Multilabel && k == 2 && len(opt.Thresholds) == 1:
		binary = opt.Thresholds[0]
	default:
		return nil, fmt.Errorf("score: %d thresholds for %d classes (multi-label %v)", len(opt.Thresholds), k, opt.Multilabel)
	}
	for _, t := range opt.Thresholds {
		if !(t >= 0 && t <= 1) {
			return nil, fmt.Errorf("score: threshold %v is outside [0, 1]", t)
		}
	}
	r := &Report{Rows: m, Classes: classes, Multilabel: opt.Multilabel, PerClass: make([]Class, k)}
	tp := make([]int, k)
	for j := range r.PerClass {
		r.PerClass[j].Name = classes[j]
	}
	var ce float64
	correct := 0
	if !opt.Multilabel {
		r.Confusion = make([][]int, k)
		for j := range r.Confusion {
			r.Confusion[j] = make([]int, k)
		}
	}
	wrong := 0
	for i := 0; i < m; i++ {
		for j := 0; j < k; j++ {
			v := p.At(i, j)
			if !(v >= 0 && v <= 1) {
				return nil, fmt.Errorf("score: row %d, class %q: probability %v is outside [0, 1]", i+1, classes[j], v)
			}
		}
		if opt.Multilabel {
			exact := true
			for j := 0; j < k; j++ {
				pv, yv := p.At(i, j), y.At(i, j) > 0.5
				dec := pv >= thr[j]
				if yv {
					ce -= math.Log(math.Max(pv, floor))
					r.PerClass[j].Rows++
				} else {
					ce -= math.Log(math.Max(1-pv, floor))
				}
				if dec {
					r.PerClass[j].Predicted++
					if yv {
						tp[j]++
					}
				}
				if dec != yv {
					exact = false
					wrong++
				}
			}
			if exact {
				correct++
			}
			continue
		}
		truth, pred := argmaxRow(y, i, k), argmaxRow(p, i, k)
		if binary >= 0 {
			pred = 0
			if p.At(i, 1) >= binary {
				pred = 1
			}
		}
		ce -= math.Log(math.Max(p.At(i, truth), floor))
		r.Confusion[truth][pred]++
		r.PerClass[truth].Rows++
		r.PerClass[pred].Predicted++
		if truth == pred {
			correct++
			tp[truth]++
		}
	}
	r.Accuracy = float64(correct) / float64(m)
	r.CrossEntropy = ce / float64(m)
	for j := range r.PerClass {
		c := &r.PerClass[j]
		c.Precision = ratio(tp[j], c.Predicted)
		c.Recall = ratio(tp[j], c.Rows)
		if c.Precision+c.Recall > 0 {
			c.F1 = 2 * c.Precision * c.Recall / (c.Precision + c.Recall)
		}
		r.MacroF1 += c.F1 / float64(k)
	}
	if opt.Multilabel {
		h := float64(wrong) / float64(m*k)
		r.HammingLoss = &h
		r.Threshold = thr[0]
		for _, t := range thr {
			if t != thr[0] {
				r.Threshold = 0 // differs by class: see PerClass
			}
		}
		for j := range r.PerClass {
			r.PerClass[j].Threshold = nullable(thr[j])
		}
	} else if binary >= 0 {
		r.PerClass[1].Threshold = nullable(binary)
	}
	rk, err := Rank(p, y, classes)
	if err != nil {
		return nil, err
	}
	for j := range r.PerClass {
		r.PerClass[j].ROCAUC = nullable(rk.PerClass[j].ROCAUC)
		r.PerClass[j].AveragePrecision = nullable(rk.PerClass[j].AveragePrecision)
	}
	r.MacroROCAUC, r.MacroAveragePrecision = nullable(rk.MacroROCAUC), nullable(rk.MacroAveragePrecision)
	rel, err := ReliabilityDiagram(p, y, classes, opt.Multilabel)
	if err != nil {
		return nil, err
	}
	r.ECE, r.Ranking, r.Reliability = rel.ECE, rk, rel
	return r, nil
}

// nullable returns nil for NaN (written as JSON null), else &v.
func nullable(v float64) *float64 {
	if math.IsNaN(v) {
		return nil
	}
	return &v
}

func ratio(a, b int) float64 {
	if b == 0 {
		return 0
	}
	return float64(a) / float64(b)
}

// argmaxRow returns the column of the largest entry of row i (the first on
// a tie).
func argmaxRow(a mat.Matrix, i, k int) int {
	best := 0
	for j := 1; j < k; j++ {
		if a.At(i, j) > a.At(i, best) {
			best = j
		}
	}
	return best
}

// Accuracy returns the share of rows whose most probable class is the true
// one (single-label), or whose decided class set equals the true set at
// threshold 0.5 (multilabel). It allocates nothing.
func Accuracy(p, y mat.Matrix, multilabel bool) float64 {
	m, k := p.Dims()
	if m == 0 {
		return math.NaN()
	}
	correct := 0
	for i := 0; i < m; i++ {
		if multilabel {
			exact := true
			for j := 0; j < k && exact; j++ {
				exact = (p.At(i, j) >= 0.5) == (y.At(i, j) > 0.5)
			}
			if exact {
				correct++
			}
		} else if argmaxRow(p, i, k) == argmaxRow(y, i, k) {
			correct++
		}
	}
	return float64(correct) / float64(m)
}
