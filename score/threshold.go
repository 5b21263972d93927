package score

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Rule names how an operating threshold is chosen.
type Rule int

const (
	// MaxF1 picks the threshold with the highest F1. It is the zero value.
	MaxF1 Rule = iota
	// TargetRecall picks, among thresholds whose recall is at least the
	// target, the one with the highest precision.
	TargetRecall
	// TargetPrecision picks, among thresholds whose precision is at least
	// the target, the one with the highest recall.
	TargetPrecision
)

var ruleNames = [...]string{MaxF1: "max-f1", TargetRecall: "target-recall", TargetPrecision: "target-precision"}

// String returns "max-f1", "target-recall" or "target-precision".
func (r Rule) String() string {
	if r >= 0 && int(r) < len(ruleNames) {
		return ruleNames[r]
	}
	return fmt.Sprintf("Rule(%d)", int(r))
}

// MarshalText writes the rule's name; an unknown rule is an error
// wrapping ErrValue.
func (r Rule) MarshalText() ([]byte, error) {
	if r < 0 || int(r) >= len(ruleNames) {
		return nil, fmt.Errorf("score: %v: %w", r, ErrValue)
	}
	return []byte(ruleNames[r]), nil
}

// UnmarshalText reads a rule's name, matched exactly (case included);
// any other text is an error wrapping ErrValue.
func (r *Rule) UnmarshalText(b []byte) error {
	for i, n := range ruleNames {
		if string(b) == n {
			*r = Rule(i)
			return nil
		}
	}
	return fmt.Errorf("score: rule %q: want max-f1, target-recall or target-precision: %w", b, ErrValue)
}

// Operating is an operating point: a threshold and the figures at it on
// the rows it was chosen on.
type Operating struct {
	Rule      Rule    `json:"rule"`
	Target    float64 `json:"target,omitempty"` // the target recall or precision; 0 for MaxF1
	Threshold float64 `json:"threshold"`        // a row is decided positive when its probability ≥ Threshold
	Precision float64 `json:"precision"`        // TP/(TP+FP)
	Recall    float64 `json:"recall"`           // TP/(TP+FN), the true positive rate
	F1        float64 `json:"f1"`               // 2TP/(2TP+FP+FN)
	FPR       float64 `json:"fpr"`              // FP/(FP+TN), the false positive rate; 0 when no negative rows
}

// ChooseThreshold picks the operating threshold of one sigmoid unit from
// its probabilities on the given rows (normally holdout rows) and the
// rows' labels, by rule:
//
//   - MaxF1: the highest F1 = 2TP/(2TP+FP+FN); target is ignored.
//   - TargetRecall: the highest precision among thresholds with
//     recall ≥ target.
//   - TargetPrecision: the highest recall among thresholds with
//     precision ≥ target.
//
// The candidate thresholds are the distinct probabilities; a row is
// decided positive when its probability is ≥ the threshold, so every
// candidate decides at least one row positive and precision is always
// defined. Ties in the figure being maximised go to the highest
// threshold (the fewest positive decisions). target must lie in (0, 1]
// for TargetRecall and TargetPrecision.
//
// Errors wrap ErrShape, ErrValue (a probability outside [0, 1], a bad
// target or rule), ErrNoPositives (no positive row: recall is undefined)
// or ErrUnreachable (no candidate reaches the target; the message gives
// the best that can be reached).
func ChooseThreshold(probs []float64, positive []bool, rule Rule, target float64) (Operating, error) {
	for i, v := range probs {
		if !(v >= 0 && v <= 1) {
			return Operating{}, fmt.Errorf("score: row %d: probability %v is outside [0, 1]: %w", i+1, v, ErrValue)
		}
	}
	switch rule {
	case MaxF1:
		target = 0
	case TargetRecall, TargetPrecision:
		if !(target > 0 && target <= 1) {
			return Operating{}, fmt.Errorf("score: %v %v: want a target in (0, 1]: %w", rule, target, ErrValue)
		}
	default:
		return Operating{}, fmt.Errorf("score: %v: %w", rule, ErrValue)
	}
	st, err := cumulate(probs, positive)
	if err != nil {
		return Operating{}, err
	}
	if st.pos == 0 {
		return Operating{}, fmt.Errorf("score: %d rows: %w", len(probs), ErrNoPositives)
	}
	best, bestVal := -1, math.Inf(-1)
	reach := math.Inf(-1) // the best recall or precision seen, for the message
	for j := range st.thr {
		tp, fp := st.tp[j], st.fp[j]
		prec := float64(tp) / float64(tp+fp)
		rec := float64(tp) / float64(st.pos)
		var val float64
		switch rule {
		case MaxF1:
			val = 2 * float64(tp) / float64(2*tp+fp+(st.pos-tp))
		case TargetRecall:
			reach = math.Max(reach, rec)
			if rec < target {
				continue
			}
			val = prec
		case TargetPrecision:
			reach = math.Max(reach, prec)
			if prec < target {
				continue
			}
			val = rec
		}
		if val > bestVal { // strict: a tie keeps the higher threshold seen first
			best, bestVal = j, val
		}
	}
	if best < 0 {
		what := "recall"
		if rule == TargetPrecision {
			what = "precision"
		}
		return Operating{}, fmt.Errorf("score: %s %v: the highest %s over %d thresholds is %v: %w",
			what, target, what, len(st.thr), reach, ErrUnreachable)
	}
	tp, fp := st.tp[best], st.fp[best]
	return Operating{
		Rule:      rule,
		Target:    target,
		Threshold: st.thr[best],
		Precision: float64(tp) / float64(tp+fp),
		Recall:    float64(tp) / float64(st.pos),
		F1:        2 * float64(tp) / float64(2*tp+fp+(st.pos-tp)),
		FPR:       ratio(fp, st.neg),
	}, nil
}

// ChooseThresholds picks one operating threshold per column of p (a
// multi-label model's classes, or the one unit of a binary sigmoid
// model), taking Y_ik > 0.5 as positive; see ChooseThreshold. classes
// names the columns; errors name the class.
func ChooseThresholds(p, y mat.Matrix, classes []string, rule Rule, target float64) ([]Operating, error) {
	m, k, err := checkProbs(p, y, classes)
	if err != nil {
		return nil, err
	}
	out := make([]Operating, k)
	probs := make([]float64, m)
	pos := make([]bool, m)
	for j := 0; j < k; j++ {
		for i := 0; i < m; i++ {
			probs[i] = p.At(i, j)
			pos[i] = y.At(i, j) > 0.5
		}
		if out[j], err = ChooseThreshold(probs, pos, rule, target); err != nil {
			return nil, fmt.Errorf("score: class %q: %w", classes[j], err)
		}
	}
	return out, nil
}
