package nn

import (
	"fmt"
	"math"
	"slices"

	"github.com/seine-ml/seine/spec"
)

// Decision is how a model turns its output into probabilities and classes
// beyond the trained net: a temperature that calibrates the probabilities
// and operating thresholds for sigmoid outputs, both chosen on holdout rows
// (see train.Options). The zero value changes nothing. It is stored in the
// model file, inside the checksum.
type Decision struct {
	// Temperature T > 0 divides the output pre-activations before the
	// output activation, h = g(z/T) (temperature scaling, Guo, Pleiss, Sun
	// & Weinberger 2017). 0 and 1 mean none; with none the probabilities
	// are bit for bit those of the net.
	Temperature float64 `json:"temperature"`
	// Thresholds are operating thresholds for sigmoid outputs: for a
	// multi-label model one per class, the probability at or above which
	// the class is decided present; for a binary model (one sigmoid unit)
	// one, on the probability of Classes[1]. nil means 0.5 for multi-label
	// models and the most probable class for binary ones. Softmax models
	// always take the most probable class.
	Thresholds []float64 `json:"thresholds"`
	// Rule and Target say how the thresholds were chosen (a score.Rule
	// name such as "max-f1", and its target recall or precision); they do
	// not change predictions.
	Rule   string  `json:"rule,omitempty"`
	Target float64 `json:"target,omitempty"`
}

// IsZero reports whether d changes nothing.
func (d Decision) IsZero() bool {
	return (d.Temperature == 0 || d.Temperature == 1) && d.Thresholds == nil && d.Rule == "" && d.Target == 0
}

// check reports what is wrong with d for a model of the spec s.
func (d Decision) check(s *spec.Network) error {
	if t := d.Temperature; t != 0 && !(t > 0 && !math.IsInf(t, 0)) {
		return fmt.Errorf("%w: decision: temperature %v, want a finite number > 0", ErrModel, t)
	}
	if d.Thresholds == nil {
		return nil
	}
	want := 0
	switch {
	case s.Output.Activation != spec.Sigmoid:
		return fmt.Errorf("%w: decision: thresholds apply to sigmoid outputs only; a softmax model takes the most probable class", ErrModel)
	case s.Output.Multilabel:
		want = len(s.Output.Classes)
	default:
		want = 1
	}
	if len(d.Thresholds) != want {
		return fmt.Errorf("%w: decision: %d thresholds, the model needs %d", ErrModel, len(d.Thresholds), want)
	}
	for i, t := range d.Thresholds {
		if !(t >= 0 && t <= 1) {
			return fmt.Errorf("%w: decision: threshold %d is %v, want a probability in [0, 1]", ErrModel, i, t)
		}
	}
	return nil
}

// tempered returns the params the model predicts with: params itself, or,
// with a temperature T ≠ 1, a copy whose output layer's weights and bias
// are divided by T, so that every prediction path computes
// g((W a + b)/T) = g(W/T a + b/T).
func (m *Model) tempered() []float64 {
	t := m.decision.Temperature
	if t == 0 || t == 1 {
		return m.params
	}
	p := slices.Clone(m.params)
	w, b := m.net.Block(m.net.NumLayers() - 1)
	for i := w; i < b+m.net.Outputs(); i++ {
		p[i] /= t
	}
	return p
}

// decide returns the class index of the class probabilities p: the most
// probable class (the first on a tie), or for a binary sigmoid model with a
// threshold t, class 1 when p[1] ≥ t.
func (m *Model) decide(p []float64) int {
	if len(m.decision.Thresholds) == 1 && len(p) == 2 && !m.spec.Output.Multilabel {
		if p[1] >= m.decision.Thresholds[0] {
			return 1
		}
		return 0
	}
	return argmax(p)
}

// threshold returns the decision threshold of class k of a multi-label
// model: the model's, or 0.5.
func (m *Model) threshold(k int) float64 {
	if m.decision.Thresholds != nil && m.spec.Output.Multilabel {
		return m.decision.Thresholds[k]
	}
	return 0.5
}

// SetDecision checks d against the model and makes every prediction use
// it. Call it before the model is shared between goroutines.
func (m *Model) SetDecision(d Decision) error {
	if err := d.check(m.spec); err != nil {
		return err
	}
	m.decision = d
	m.fwd = m.tempered()
	return nil
}
