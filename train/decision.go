package train

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// ThresholdRule chooses operating thresholds on the holdout rows (see
// score.ChooseThreshold): the threshold with the highest F1
// (score.MaxF1), the highest precision among those with recall ≥ Target
// (score.TargetRecall), or the highest recall among those with precision ≥
// Target (score.TargetPrecision). It applies to sigmoid outputs: one
// threshold for a binary model, one per class for a multi-label model.
type ThresholdRule struct {
	Rule   score.Rule
	Target float64 // in (0, 1] for the target rules; ignored by MaxF1
}

// decide fits the model's decision on the holdout rows hx (encoded) with
// targets hold.Y: a temperature when cfg.Calibrate, then thresholds by
// cfg.Thresholds on the calibrated probabilities; and records the holdout
// figures in sm, the model's summary.
func decide(model *nn.Model, sm *nn.Summary, params []float64, hx *mat.Dense, hold *data.Set, cfg Options) error {
	s := model.Spec()
	net := model.Net()
	r, _ := hx.Dims()
	z := mat.DenseCopyOf(net.Logits(net.NewWorkspace(r), params, hx))
	out := score.Softmax
	y := mat.Matrix(hold.Y)
	if s.Output.Activation == spec.Sigmoid {
		out = score.Sigmoid
		if net.Outputs() == 1 {
			y = hold.Y.Slice(0, r, 1, 2) // the unit is the probability of class 1
		}
	}
	var d nn.Decision
	probs := func(t float64) (*mat.Dense, error) {
		zt := z
		if t != 1 {
			zt = new(mat.Dense)
			if err := score.ApplyTemperature(zt, z, t); err != nil {
				return nil, err
			}
		}
		var p mat.Dense
		if err := score.Probabilities(&p, zt, out); err != nil {
			return nil, err
		}
		return classColumns(&p, len(model.Classes())), nil
	}
	ece := func(t float64) (float64, *mat.Dense, error) {
		p, err := probs(t)
		if err != nil {
			return 0, nil, err
		}
		rel, err := score.ReliabilityDiagram(p, hold.Y, model.Classes(), s.Output.Multilabel)
		if err != nil {
			return 0, nil, err
		}
		return rel.ECE, p, nil
	}
	before, p, err := ece(1)
	if err != nil {
		return fmt.Errorf("train: holdout calibration: %w", err)
	}
	sm.HoldoutECEBefore, sm.HoldoutECE = before, before
	if cfg.Calibrate {
		t, err := score.FitTemperature(z, y, out)
		if err != nil {
			return fmt.Errorf("train: fitting the temperature on the holdout rows: %w", err)
		}
		d.Temperature = t.T
		if sm.HoldoutECE, p, err = ece(t.T); err != nil {
			return fmt.Errorf("train: holdout calibration: %w", err)
		}
	}
	if th := cfg.Thresholds; th != nil { // sigmoid outputs only: Train checked
		d.Rule, d.Target = th.Rule.String(), th.Target
		var ops []score.Operating
		var names []string
		if s.Output.Multilabel {
			if ops, err = score.ChooseThresholds(p, hold.Y, model.Classes(), th.Rule, th.Target); err != nil {
				return fmt.Errorf("train: choosing thresholds on the holdout rows: %w", err)
			}
			names = model.Classes()
		} else {
			probs1 := mat.Col(nil, 1, p)
			pos := make([]bool, r)
			for i := range pos {
				pos[i] = hold.Y.At(i, 1) > 0.5
			}
			op, err := score.ChooseThreshold(probs1, pos, th.Rule, th.Target)
			if err != nil {
				return fmt.Errorf("train: choosing the threshold of %q on the holdout rows: %w", model.Classes()[1], err)
			}
			ops, names = []score.Operating{op}, model.Classes()[1:]
		}
		for i, op := range ops {
			d.Thresholds = append(d.Thresholds, op.Threshold)
			sm.Operating = append(model.Summary().Operating, nn.OperatingPoint{
				Class: names[i], Threshold: op.Threshold, Precision: op.Precision, Recall: op.Recall, F1: op.F1})
		}
	}
	return model.SetDecision(d)
}

// classColumns returns the class probabilities of the output probabilities
// p of a net: p itself, or for a binary sigmoid net (one unit, the
// probability of class 1, with two classes) the two columns 1−p and p.
func classColumns(p *mat.Dense, classes int) *mat.Dense {
	r, c := p.Dims()
	if c != 1 || classes != 2 {
		return p
	}
	two := mat.NewDense(r, 2, nil)
	for i := range r {
		v := p.At(i, 0)
		two.Set(i, 0, 1-v)
		two.Set(i, 1, v)
	}
	return two
}

// noDecision marks the calibration figures of a summary as not measured.
func noDecision(sm *nn.Summary) {
	sm.HoldoutECE, sm.HoldoutECEBefore = math.NaN(), math.NaN()
}
