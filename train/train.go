// Package train turns a spec and a data set into a model: it fits the
// encoder (levels, fill values, scaling) on the training rows only, builds
// the cost objective of the net (full batch, or mini-batches for momentum
// and Adam), runs an optim method with the caller's context, limits and
// observer, measures the holdout rows after every iteration when a holdout
// is given, and can keep the params with the lowest holdout cost (early
// stopping with patience; Prechelt 1998 discusses the criterion). With a
// holdout it can also calibrate the model and choose its operating
// thresholds (Options.Calibrate, Options.Thresholds).
package train

import (
	"context"
	"errors"
	"fmt"
	"math"
	"time"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// Options sets a training run. Its zero value trains with the spec's `train:`
// defaults, standardised features and no holdout.
type Options struct {
	// Method is the optimizer; nil means the one the spec names (with the
	// spec's rate, and mini-batch shuffles seeded by Seed), or L-BFGS when
	// it names none.
	Method optim.Method
	// Limits stop the run. A zero Iterations takes the spec's iterations
	// (then optim's default); a zero GradTol the spec's tolerance (then
	// optim's default). Limits.Observer is called after Progress.
	Limits optim.Limits
	// Batch is the mini-batch size in rows for momentum and Adam; 0 takes
	// the spec's batch, and when that is 0 too, DefaultBatch.
	Batch int
	// Holdout rows are scored after every iteration; nil means none.
	Holdout *data.Set
	// KeepBest returns the params with the lowest holdout cost seen rather
	// than the last ones. It needs Holdout.
	KeepBest bool
	// Patience stops the run after this many iterations without a lower
	// holdout cost; 0 means never. It needs Holdout.
	Patience int
	// NoScale leaves the features as they are instead of standardising them.
	NoScale bool
	// DropRows lets Train set the training set's X to nil once its rows
	// are encoded, so that a caller that has no more use for the rows as
	// read holds the training data once, encoded, while the net trains:
	// the rows as read are then free for the collector. Labels, classes,
	// names and Rows() stay; the holdout rows are kept (the model's own
	// probabilities on them are measured at the end). The caller must not
	// read the training set's X after.
	DropRows bool
	// Start is the initial params (copied); nil means the spec's
	// initialisation with Seed.
	Start []float64
	// Seed overrides the spec's init seed when non-zero; it also seeds the
	// mini-batch shuffles of momentum and Adam chosen from the spec.
	Seed uint64
	// Workers bounds the goroutines of one evaluation; 0 means GOMAXPROCS.
	// Results are bit-identical whatever it is.
	Workers int
	// Progress, when non-nil, is called after every iteration; returning
	// true stops the run.
	Progress func(Progress) (stop bool)
	// Calibrate fits a temperature on the holdout rows (temperature
	// scaling, Guo et al. 2017) and stores it in the model. It needs
	// Holdout.
	Calibrate bool
	// Thresholds, when non-nil, chooses operating thresholds on the
	// holdout rows by its rule and stores them in the model (sigmoid
	// outputs only). It needs Holdout.
	Thresholds *ThresholdRule
	// Checkpoint, when its Every is > 0, is given a model of the current
	// params every Every iterations, built with the run's own encoder, so
	// that a caller can save it. Its error does not stop the run; the run
	// stops calling it after the first.
	Checkpoint Checkpoint
}

// Checkpoint asks Train for models of the params during a run.
type Checkpoint struct {
	Every int                     // iterations between models; 0 means none
	Save  func(m *nn.Model) error // called with a model whose summary holds the step's figures, Status optim.Running
}

// Progress is the record of one iteration, with the holdout figures (NaN
// without a holdout).
type Progress struct {
	optim.Step
	HoldoutCost     float64
	HoldoutAccuracy float64
}

// Result is the outcome of a training run.
type Result struct {
	Model    *nn.Model
	Run      optim.Result // the optimizer's own result (Run.X is the final point)
	Trace    []Progress   // one entry per iteration
	Warnings []string     // e.g. constant feature columns
	BestIter int          // iteration whose params the model holds (KeepBest), else the last
}

// ErrOptions is wrapped by errors in a Options or in how it fits the data.
var ErrOptions = fit.ErrOptions

// DefaultBatch is the mini-batch size, in rows, of momentum and Adam when
// neither Options.Batch nor the spec's train.batch sets one; the other
// methods use every row at every step. Mini-batches of 32 rows are common
// practice and train well on the demos, where full-batch Adam at its
// default rate stalled below the majority-class share; `seine train` and
// `seine compare` both use it.
const DefaultBatch = fit.DefaultBatch

// ErrNotFiniteParams is wrapped by the error of a run whose params ended
// NaN or ±Inf: no model is built from them.
var ErrNotFiniteParams = errors.New("train: params not finite")

// Train fits the net that s describes to the rows of set.
//
// On a run that ends early (cancelled, diverged, a failed line search) it
// returns the best model it has together with an error wrapping the cause,
// so that a caller can still save the last good params: check Result.Model
// before giving up. The model never holds non-finite params.
func Train(ctx context.Context, s *spec.Network, set *data.Set, cfg Options) (*Result, error) {
	if err := checkOptions(s, set, cfg); err != nil {
		return nil, err
	}
	seed := s.Init.Seed
	if cfg.Seed != 0 {
		seed = cfg.Seed
	}
	method := cfg.Method
	if method == nil {
		var err error
		if method, err = fit.MethodFor(s.Train.Optimizer, s.Train.Rate, seed); err != nil {
			return nil, err
		}
	}
	lim, batch := fit.Defaults(s, cfg.Limits, cfg.Batch)

	r := newRun(set, cfg, seed)
	defer r.close()
	if err := r.prepare(s, batch); err != nil {
		return nil, err
	}
	x0, err := r.initialParams()
	if err != nil {
		return nil, err
	}

	r.userObs = lim.Observer
	lim.Observer = r.observe
	start := time.Now()
	out, runErr := optim.Minimize(ctx, r.obj, x0, method, lim)
	if out.X == nil {
		return nil, fmt.Errorf("train: %w", runErr)
	}
	params, err := r.params(out, runErr)
	if err != nil {
		return nil, err
	}
	model, err := r.buildModel(method, out, params, start)
	if err != nil {
		return nil, err
	}
	if err := r.measureHoldout(model, params); err != nil {
		return nil, err
	}
	res := &Result{Model: model, Run: out, Trace: r.trace, BestIter: r.bestIter,
		Warnings: append(r.warn, fitWarnings(model, set, cfg.Holdout, out)...)}
	if runErr != nil {
		return res, fmt.Errorf("train: %w", runErr)
	}
	return res, nil
}

// checkOptions reports how s, set and cfg cannot make a training run: a nil
// spec or set, an invalid spec, rows that do not fit the spec, options
// that need a holdout without one, thresholds for a softmax output, or
// negative counts.
func checkOptions(s *spec.Network, set *data.Set, cfg Options) error {
	if s == nil || set == nil {
		return fmt.Errorf("%w: nil spec or data set", ErrOptions)
	}
	if err := fit.CheckSpec(s); err != nil {
		return err
	}
	if err := fit.CheckSet(s, set, "training"); err != nil {
		return fmt.Errorf("%w: %w", ErrOptions, err)
	}
	if cfg.Holdout != nil {
		if err := fit.CheckSet(s, cfg.Holdout, "holdout"); err != nil {
			return fmt.Errorf("%w: %w", ErrOptions, err)
		}
	} else if cfg.KeepBest || cfg.Patience > 0 || cfg.Calibrate || cfg.Thresholds != nil {
		return fmt.Errorf("%w: keeping the best params, patience, calibration and thresholds need holdout rows", ErrOptions)
	}
	if cfg.Thresholds != nil && s.Output.Activation != spec.Sigmoid {
		return fmt.Errorf("%w: operating thresholds apply to sigmoid outputs; a softmax model takes the most probable class", ErrOptions)
	}
	if cfg.Patience < 0 || cfg.Batch < 0 || cfg.Workers < 0 {
		return fmt.Errorf("%w: patience, batch and workers must not be negative", ErrOptions)
	}
	return nil
}

// saveCheckpoint hands ck.Save a model of the params xk at the step st,
// built with the run's encoder, whose summary holds the step's figures.
func saveCheckpoint(ck Checkpoint, prep *fit.Prepared, set *data.Set, seed uint64, st optim.Step, xk []float64) error {
	m, err := nn.NewModel(prep.Spec, append([]float64(nil), xk...), prep.Encoder, set.Classes)
	if err != nil {
		return err
	}
	if err := m.SetLabel(set.Label); err != nil {
		return err
	}
	m.SetSummary(nn.Summary{Iterations: st.Iter, Evaluations: st.Evaluations, Elapsed: st.Elapsed,
		Status: optim.Running, Cost: st.Cost, TrainRows: set.Rows(), Seed: seed, Library: nn.Version,
		TrainAccuracy: math.NaN(), HoldoutCost: math.NaN(), HoldoutAccuracy: math.NaN(), HoldoutECE: math.NaN(), HoldoutECEBefore: math.NaN()})
	return ck.Save(m)
}

// methodName gives the spec name of the known methods.
func methodName(m optim.Method) string {
	switch m.(type) {
	case *optim.GradientDescent:
		return "gd"
	case *optim.ConjugateGradient:
		return "cg"
	case *optim.LBFGS:
		return "lbfgs"
	case *optim.Momentum:
		return "momentum"
	case *optim.Adam:
		return "adam"
	}
	return fmt.Sprintf("%T", m)
}
