// Package fit holds the plumbing of a training run that train, diag and the
// tool share: the encoder fitted on training rows (Prepare), the method a
// spec names (MethodFor), the spec's training defaults (Defaults), the
// checks of a spec and a data set against each other, the class weights a
// spec asks for, and the Scorer of holdout rows. It is internal: programs
// train through package train.
package fit

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// ErrOptions is wrapped by errors in a training configuration or in how it
// fits the data; train.ErrOptions is the same error.
var ErrOptions = errors.New("train: bad configuration")

// MethodFor returns the optim method that a spec's optimizer name stands
// for, with the learning rate set where the method has one (0 keeps the
// method's default) and the mini-batch shuffles seeded. GD with rate 0 uses
// a backtracking line search.
func MethodFor(o spec.Optimizer, rate float64, seed uint64) (optim.Method, error) {
	switch o {
	case spec.GD:
		return &optim.GradientDescent{Step: rate}, nil
	case spec.CG:
		return &optim.ConjugateGradient{}, nil
	case 0, spec.LBFGS:
		return &optim.LBFGS{}, nil
	case spec.Momentum:
		return &optim.Momentum{Rate: rate, Seed: seed}, nil
	case spec.Adam:
		return &optim.Adam{Rate: rate, Seed: seed}, nil
	}
	return nil, fmt.Errorf("%w: unknown optimizer %v", ErrOptions, o)
}

// Prepared is a training set made ready for a net: the encoder fitted on
// the training rows only, the spec it resolves (category inputs with their
// levels: the spec of the net to compile) and the encoded rows.
type Prepared struct {
	Encoder  *encode.Encoder
	Spec     *spec.Network // resolved: Width() is Encoder.Width()
	X        *mat.Dense    // the training rows, encoded
	HoldoutX *mat.Dense    // the holdout rows, encoded with the same encoder; nil without a holdout
	Warnings []string      // e.g. constant number columns
}

// Prepare fits the encoder of s on the rows of set (standardising numbers
// unless noScale) and encodes set and holdout (which may be nil) with it.
// Both sets are read with encode.ColumnsFor(s).
func Prepare(s *spec.Network, set, holdout *data.Set, noScale bool) (*Prepared, error) {
	enc, warn, err := encode.Fit(s, set, encode.Options{NoScale: noScale})
	if err != nil {
		return nil, fmt.Errorf("%w: fitting the encoder on the training rows: %w", ErrOptions, err)
	}
	p := &Prepared{Encoder: enc, Spec: enc.Resolve(s), Warnings: warn}
	if p.X, err = enc.EncodeSet(set); err != nil {
		return nil, fmt.Errorf("%w: training rows: %w", ErrOptions, err)
	}
	if holdout != nil {
		if p.HoldoutX, err = enc.EncodeSet(holdout); err != nil {
			return nil, fmt.Errorf("%w: holdout rows: %w", ErrOptions, err)
		}
	}
	return p, nil
}

// CheckSpec reports whether s can be compiled into a net once its category
// inputs have levels: everything but the widths that the training rows
// decide is checked.
func CheckSpec(s *spec.Network) error {
	_, err := nn.Compile(encode.Placeholder(s))
	return err
}

// Defaults returns lim and batch with the spec's `train:` values filled in
// where they are zero: Iterations from train.iterations, GradTol from
// train.tolerance, and the mini-batch size from train.batch, else
// DefaultBatch. What is still zero keeps optim's defaults.
func Defaults(s *spec.Network, lim optim.Limits, batch int) (optim.Limits, int) {
	if lim.Iterations == 0 {
		lim.Iterations = s.Train.Iterations
	}
	if lim.GradTol == 0 {
		lim.GradTol = s.Train.Tolerance
	}
	if batch == 0 {
		batch = s.Train.Batch
	}
	if batch == 0 {
		batch = DefaultBatch
	}
	return lim, batch
}

// DefaultBatch is the mini-batch size, in rows, of momentum and Adam when
// neither the caller nor the spec's train.batch sets one (train.DefaultBatch
// is the same value, and says why 32).
const DefaultBatch = 32

// CheckSet reports how set does not fit the net that s describes: no rows,
// another number of feature columns or classes, no labels, or another
// multi-label setting. what names the set in the message ("training").
func CheckSet(s *spec.Network, set *data.Set, what string) error {
	if set.Rows() == 0 {
		return fmt.Errorf("the %s set has no rows", what)
	}
	if _, c := set.X.Dims(); c != s.Inputs {
		return fmt.Errorf("the %s set has %d feature columns, the spec %d inputs", what, c, s.Inputs)
	}
	if set.Y == nil {
		return fmt.Errorf("the %s set has no labels", what)
	}
	if _, c := set.Y.Dims(); c != len(s.Output.Classes) {
		return fmt.Errorf("the %s set has %d classes, the spec %d", what, c, len(s.Output.Classes))
	}
	if set.Multilabel != s.Output.Multilabel {
		return fmt.Errorf("the %s set is multi-label=%v, the spec multilabel=%v", what, set.Multilabel, s.Output.Multilabel)
	}
	return nil
}

// Scorer measures params on a fixed set of encoded rows: the mean
// cross-entropy without the penalty (nats) and the accuracy. Used for
// holdout rows during training and by the diagnostics.
type Scorer struct {
	net *nn.Net
	obj *nn.Objective
	x   *mat.Dense
	set *data.Set
	ws  *nn.Workspace
}

// NewScorer returns a Scorer of the rows x (encoded as the net was trained)
// with the targets of set. workers bounds the goroutines of one evaluation,
// 0 meaning GOMAXPROCS.
func NewScorer(net *nn.Net, x *mat.Dense, set *data.Set, workers int) (*Scorer, error) {
	obj, err := nn.NewObjective(net, x, set.Y, nn.ObjectiveOptions{Workers: workers})
	if err != nil {
		return nil, err
	}
	return &Scorer{net: net, obj: obj, x: x, set: set, ws: net.NewWorkspace(min(set.Rows(), scoreBlock))}, nil
}

// scoreBlock is the number of rows a Scorer's forward passes take at a
// time, so that its workspace stays small whatever the number of rows (a
// workspace for every row of a large set cost more than the data).
const scoreBlock = 2048

// Close stops the goroutines of the Scorer's evaluations; it must not be
// used after.
func (s *Scorer) Close() error { return s.obj.Close() }

// Measure returns the mean cross-entropy (no penalty) and the share of rows
// classified right (exact-set match at 0.5 for multi-label rows) of params.
func (s *Scorer) Measure(params []float64) (cost, acc float64) {
	return s.obj.Loss(params), s.Accuracy(params)
}

// Accuracy returns the share of rows classified right (exact-set match at
// 0.5 for multi-label rows) by params.
func (s *Scorer) Accuracy(params []float64) float64 {
	r, c := s.x.Dims()
	_, k := s.set.Y.Dims()
	correct := 0.0
	for start := 0; start < r; start += scoreBlock {
		end := min(start+scoreBlock, r)
		out := s.net.Forward(s.ws, params, s.x.Slice(start, end, 0, c))
		y := s.set.Y.Slice(start, end, 0, k)
		if _, units := out.Dims(); units == 1 {
			// Binary sigmoid: the unit is the probability p of class 1,
			// and the model predicts class 1 when p > 1−p (class 0 on a
			// tie, as argmax).
			for i := 0; i < end-start; i++ {
				if (out.At(i, 0) > 0.5) == (y.At(i, 1) > 0.5) {
					correct++
				}
			}
			continue
		}
		// score.Accuracy's share of the block, times its rows: a count.
		correct += math.Round(score.Accuracy(out, y, s.set.Multilabel) * float64(end-start))
	}
	return correct / float64(r)
}
