package score

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// ROC is a receiver operating characteristic curve: one point per
// candidate threshold, from the strictest to the loosest. Point n counts
// the rows whose score is at least Threshold[n] as positive decisions.
type ROC struct {
	// Threshold is +Inf (no row decided positive, the point (0, 0)),
	// then the distinct scores in descending order.
	Threshold []float64
	// FPR is the false positive rate FP/N at each threshold; NaN for
	// every point when there are no negative rows.
	FPR []float64
	// TPR is the true positive rate (recall) TP/P at each threshold; NaN
	// for every point when there are no positive rows.
	TPR []float64
}

// PR is a precision–recall curve: one point per distinct score, from
// the highest to the lowest. Point n counts the rows whose score is at
// least Threshold[n] as positive decisions. It has no point for "no row
// decided positive", where precision is undefined.
type PR struct {
	Threshold []float64 // the distinct scores, descending
	Precision []float64 // TP/(TP+FP) at each threshold
	Recall    []float64 // TP/P at each threshold; NaN when there are no positive rows
}

// steps holds, for each distinct score s_n in descending order, the
// number of positive and negative rows whose score is ≥ s_n.
type steps struct {
	thr    []float64
	tp, fp []int
	pos    int // positive rows in all
	neg    int // negative rows in all
}

// cumulate sorts the rows by descending score and groups equal scores,
// so that tied rows enter the counts together.
func cumulate(scores []float64, positive []bool) (steps, error) {
	if len(scores) != len(positive) {
		return steps{}, fmt.Errorf("score: %d scores for %d labels: %w", len(scores), len(positive), ErrShape)
	}
	if len(scores) == 0 {
		return steps{}, fmt.Errorf("score: no rows: %w", ErrShape)
	}
	idx := make([]int, len(scores))
	for i, s := range scores {
		if math.IsNaN(s) {
			return steps{}, fmt.Errorf("score: row %d: score is NaN: %w", i+1, ErrValue)
		}
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return scores[idx[a]] > scores[idx[b]] })
	var st steps
	tp, fp := 0, 0
	for n, i := range idx {
		if positive[i] {
			tp++
		} else {
			fp++
		}
		if n+1 == len(idx) || scores[idx[n+1]] != scores[i] {
			st.thr = append(st.thr, scores[i])
			st.tp = append(st.tp, tp)
			st.fp = append(st.fp, fp)
		}
	}
	st.pos, st.neg = tp, fp
	return st, nil
}

// ROCCurve returns the ROC curve of scores against the labels positive
// (one per row). Scores may be any real numbers but not NaN; ties are
// grouped, so each distinct score gives one point. Errors wrap ErrShape
// or ErrValue.
func ROCCurve(scores []float64, positive []bool) (ROC, error) {
	st, err := cumulate(scores, positive)
	if err != nil {
		return ROC{}, err
	}
	return st.roc(), nil
}

func (st steps) roc() ROC {
	n := len(st.thr) + 1
	c := ROC{Threshold: make([]float64, n), FPR: make([]float64, n), TPR: make([]float64, n)}
	c.Threshold[0] = math.Inf(1)
	c.FPR[0], c.TPR[0] = rate(0, st.neg), rate(0, st.pos)
	for j := range st.thr {
		c.Threshold[j+1] = st.thr[j]
		c.FPR[j+1] = rate(st.fp[j], st.neg)
		c.TPR[j+1] = rate(st.tp[j], st.pos)
	}
	return c
}

// PRCurve returns the precision–recall curve of scores against the labels
// positive. Scores may be any real numbers but not NaN; ties are grouped.
// Errors wrap ErrShape or ErrValue.
func PRCurve(scores []float64, positive []bool) (PR, error) {
	st, err := cumulate(scores, positive)
	if err != nil {
		return PR{}, err
	}
	return st.pr(), nil
}

func (st steps) pr() PR {
	n := len(st.thr)
	c := PR{Threshold: make([]float64, n), Precision: make([]float64, n), Recall: make([]float64, n)}
	for j := range st.thr {
		c.Threshold[j] = st.thr[j]
		c.Precision[j] = float64(st.tp[j]) / float64(st.tp[j]+st.fp[j])
		c.Recall[j] = rate(st.tp[j], st.pos)
	}
	return c
}

// rate is a/b, NaN when b is 0.
func rate(a, b int) float64 {
	if b == 0 {
		return math.NaN()
	}
	return float64(a) / float64(b)
}

// ROCArea returns the area under the ROC curve of scores against the
// labels positive, by the trapezoid rule over the distinct thresholds:
//
//	AUC = Σₙ (FPRₙ − FPRₙ₋₁)·(TPRₙ + TPRₙ₋₁)/2.
//
// This equals the Mann–Whitney statistic U/(P·N) (Mann & Whitney 1947;
// Hanley & McNeil 1982): the share of positive–negative pairs in which
// the positive row has the higher score, a tie counting one half. It is
// computed in that form, from integer counts, with a single rounding at
// the end (exact while 2·P·N < 2⁵³). It is NaN when there are no
// positive or no negative rows. Errors wrap ErrShape or ErrValue.
func ROCArea(scores []float64, positive []bool) (float64, error) {
	st, err := cumulate(scores, positive)
	if err != nil {
		return 0, err
	}
	return st.area(), nil
}

func (st steps) area() float64 {
	if st.pos == 0 || st.neg == 0 {
		return math.NaN()
	}
	// 2U = Σₙ ΔFPₙ·(TPₙ + TPₙ₋₁): each negative in group n beats the
	// TPₙ₋₁ positives above it and ties with the ΔTPₙ in its group.
	var twoU float64
	prevTP, prevFP := 0, 0
	for j := range st.thr {
		twoU += float64(st.fp[j]-prevFP) * float64(st.tp[j]+prevTP)
		prevTP, prevFP = st.tp[j], st.fp[j]
	}
	return twoU / (2 * float64(st.pos) * float64(st.neg))
}

// AveragePrecision returns the step sum over the distinct thresholds,
// from the highest score down,
//
//	AP = Σₙ (Rₙ − Rₙ₋₁)·Pₙ,   R₀ = 0,
//
// with Rₙ = TPₙ/P the recall and Pₙ = TPₙ/(TPₙ + FPₙ) the precision at
// the n-th threshold; there is no interpolation of the precision. Rₙ −
// Rₙ₋₁ is computed as (TPₙ − TPₙ₋₁)/P. It is NaN when there are no
// positive rows. Errors wrap ErrShape or ErrValue.
func AveragePrecision(scores []float64, positive []bool) (float64, error) {
	st, err := cumulate(scores, positive)
	if err != nil {
		return 0, err
	}
	return st.averagePrecision(), nil
}

func (st steps) averagePrecision() float64 {
	if st.pos == 0 {
		return math.NaN()
	}
	var ap float64
	prevTP := 0
	for j := range st.thr {
		if d := st.tp[j] - prevTP; d > 0 {
			ap += float64(d) / float64(st.pos) * (float64(st.tp[j]) / float64(st.tp[j]+st.fp[j]))
		}
		prevTP = st.tp[j]
	}
	return ap
}

// Ranking holds the one-vs-rest ranking figures of one class: its
// probability column as the score, rows carrying the class as positives.
type Ranking struct {
	Name      string
	Positives int // rows that carry the class
	Negatives int // rows that do not
	// ROCAUC is the area under the ROC curve (see ROCArea); NaN when
	// the class has no positive or no negative rows.
	ROCAUC float64
	// AveragePrecision is the step sum (see AveragePrecision); NaN when
	// the class has no positive or no negative rows.
	AveragePrecision float64
	ROC              ROC
	PR               PR
}

// Rankings holds the ranking figures of every class and their macro
// means.
type Rankings struct {
	PerClass []Ranking
	// MacroROCAUC and MacroAveragePrecision are the means over the
	// classes that have both positive and negative rows; NaN when no
	// class has both.
	MacroROCAUC           float64
	MacroAveragePrecision float64
	// Counted is the number of classes in the macro means.
	Counted int
}

// Rank computes, for each of the K classes, the one-vs-rest ROC and
// precision–recall curves, the ROC area and the average precision,
// taking column k of p as the score and Y_ik > 0.5 as "row i carries
// class k" (single-label and multi-label data alike). classes names the
// columns. A class without positive rows or without negative rows gets
// NaN for both figures (the curves are still returned) and is left out
// of the macro means:
//
//	macro ROC AUC = (1/|C|) Σ_{k∈C} AUC_k,   C = classes with P_k > 0 and N_k > 0,
//
// and likewise for the average precision. Errors wrap ErrShape or
// ErrValue (a probability outside [0, 1], with its row and class).
func Rank(p, y mat.Matrix, classes []string) (*Rankings, error) {
	m, k, err := checkProbs(p, y, classes)
	if err != nil {
		return nil, err
	}
	r := &Rankings{PerClass: make([]Ranking, k)}
	scores := make([]float64, m)
	pos := make([]bool, m)
	var sumAUC, sumAP float64
	for j := 0; j < k; j++ {
		for i := 0; i < m; i++ {
			scores[i] = p.At(i, j)
			pos[i] = y.At(i, j) > 0.5
		}
		st, err := cumulate(scores, pos)
		if err != nil {
			return nil, fmt.Errorf("score: class %q: %w", classes[j], err)
		}
		rk := Ranking{Name: classes[j], Positives: st.pos, Negatives: st.neg,
			ROCAUC: math.NaN(), AveragePrecision: math.NaN()}
		rk.ROC, rk.PR = st.roc(), st.pr()
		if st.pos > 0 && st.neg > 0 {
			rk.ROCAUC = st.area()
			rk.AveragePrecision = st.averagePrecision()
			sumAUC += rk.ROCAUC
			sumAP += rk.AveragePrecision
			r.Counted++
		}
		r.PerClass[j] = rk
	}
	r.MacroROCAUC, r.MacroAveragePrecision = math.NaN(), math.NaN()
	if r.Counted > 0 {
		r.MacroROCAUC = sumAUC / float64(r.Counted)
		r.MacroAveragePrecision = sumAP / float64(r.Counted)
	}
	return r, nil
}

// checkProbs checks that p and y are both m × K with m > 0, that classes
// names the K columns, and that every entry of p lies in [0, 1].
func checkProbs(p, y mat.Matrix, classes []string) (m, k int, err error) {
	m, k = p.Dims()
	ym, yk := y.Dims()
	if m != ym || k != yk || k != len(classes) {
		return 0, 0, fmt.Errorf("score: probabilities are %d×%d, targets %d×%d, %d class names: %w", m, k, ym, yk, len(classes), ErrShape)
	}
	if m == 0 || k == 0 {
		return 0, 0, fmt.Errorf("score: no rows or no classes: %w", ErrShape)
	}
	for i := 0; i < m; i++ {
		for j := 0; j < k; j++ {
			if v := p.At(i, j); !(v >= 0 && v <= 1) {
				return 0, 0, fmt.Errorf("score: row %d, class %q: probability %v is outside [0, 1]: %w", i+1, classes[j], v, ErrValue)
			}
		}
	}
	return m, k, nil
}
