package train

import (
	"fmt"
	"math"
	"time"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// run holds what the steps of one Train call share: the encoder and net
// it prepares, the objective and scorers it must close, and what its
// observer records (the trace, the lowest holdout cost and its params).
type run struct {
	set  *data.Set
	cfg  Options
	seed uint64

	prep    *fit.Prepared
	net     *nn.Net
	weights []float64 // class weights of the objective, nil when none
	warn    []string  // warnings of the encoding and the class weights

	obj   *nn.Objective // the cost of the training rows
	hold  *fit.Scorer   // the holdout rows; nil without a holdout
	train *fit.Scorer   // the training rows, made for the model's summary

	userObs   func(optim.Step, []float64) bool // the caller's Limits.Observer, called last by observe
	ckFailed  bool                             // a checkpoint's Save failed: no more are made
	trace     []Progress
	best      []float64 // params of the lowest holdout cost (KeepBest)
	bestCost  float64
	bestIter  int
	sinceBest int
}

// newRun returns the run of a Train call; its caller must defer close.
func newRun(set *data.Set, cfg Options, seed uint64) *run {
	return &run{set: set, cfg: cfg, seed: seed, bestCost: math.Inf(1), bestIter: -1}
}

// close closes the scorers and the objective that were made, the last made
// first.
func (r *run) close() {
	if r.train != nil {
		r.train.Close()
	}
	if r.hold != nil {
		r.hold.Close()
	}
	if r.obj != nil {
		r.obj.Close()
	}
}

// prepare fits the encoder on the training rows, compiles the net, and
// makes the objective of the training rows (with batch rows a mini-batch)
// and the scorer of the holdout rows.
func (r *run) prepare(s *spec.Network, batch int) error {
	prep, err := fit.Prepare(s, r.set, r.cfg.Holdout, r.cfg.NoScale)
	if err != nil {
		return err
	}
	if r.cfg.DropRows {
		r.set.X = nil
	}
	net, err := nn.Compile(prep.Spec)
	if err != nil {
		return err
	}
	r.prep, r.net = prep, net
	weights, wwarn := fit.ClassWeights(s, r.set)
	r.weights, r.warn = weights, append(prep.Warnings, wwarn...)
	obj, err := nn.NewObjective(net, prep.X, r.set.Y, nn.ObjectiveOptions{Batch: batch, Workers: r.cfg.Workers, ClassWeights: weights})
	if err != nil {
		return fmt.Errorf("train: training rows: %w", err)
	}
	r.obj = obj
	if r.cfg.Holdout != nil {
		hold, err := fit.NewScorer(net, prep.HoldoutX, r.cfg.Holdout, r.cfg.Workers)
		if err != nil {
			return fmt.Errorf("train: holdout rows: %w", err)
		}
		r.hold = hold
	}
	return nil
}

// initialParams returns the params the run starts from: cfg.Start, or
// the net's initialisation with the run's seed.
func (r *run) initialParams() ([]float64, error) {
	x0 := r.cfg.Start
	if x0 == nil {
		x0 = make([]float64, r.net.NumParams())
		r.net.Init(x0, r.seed)
	} else if len(x0) != r.net.NumParams() {
		return nil, fmt.Errorf("%w: start has %d params, the net has %d", ErrOptions, len(x0), r.net.NumParams())
	}
	return x0, nil
}

// observe is the optimizer's observer: it hands a checkpoint to
// cfg.Checkpoint when one is due, measures the holdout rows, keeps the
// best params, records the step in the trace, and calls cfg.Progress and
// the caller's own observer. It returns true to stop the run: patience
// ran out, or Progress or the observer asked.
func (r *run) observe(st optim.Step, xk []float64) bool {
	if ck := r.cfg.Checkpoint; ck.Every > 0 && ck.Save != nil && st.Iter%ck.Every == 0 && !r.ckFailed {
		r.ckFailed = saveCheckpoint(ck, r.prep, r.set, r.seed, st, xk) != nil
	}
	p := Progress{Step: st, HoldoutCost: math.NaN(), HoldoutAccuracy: math.NaN()}
	stop := false
	if r.hold != nil {
		p.HoldoutCost, p.HoldoutAccuracy = r.hold.Measure(xk)
		stop = r.track(p.HoldoutCost, st.Iter, xk)
	}
	r.trace = append(r.trace, p)
	if r.cfg.Progress != nil && r.cfg.Progress(p) {
		stop = true
	}
	if r.userObs != nil && r.userObs(st, xk) {
		stop = true
	}
	return stop
}

// track notes the holdout cost of the params xk at iteration iter: a lower
// one than any before becomes the best (its params kept with KeepBest).
// It returns true when cfg.Patience iterations have passed without one.
func (r *run) track(cost float64, iter int, xk []float64) (outOfPatience bool) {
	if cost < r.bestCost {
		r.bestCost, r.sinceBest, r.bestIter = cost, 0, iter
		if r.cfg.KeepBest {
			r.best = append(r.best[:0], xk...)
		}
		return false
	}
	r.sinceBest++
	return r.cfg.Patience > 0 && r.sinceBest >= r.cfg.Patience
}

// params returns the params to build the model from, the best ones seen
// with KeepBest and the optimizer's last ones otherwise (then setting the
// best iteration to the last), or an error wrapping ErrNotFiniteParams and
// runErr when one of them is not finite.
func (r *run) params(out optim.Result, runErr error) ([]float64, error) {
	params := out.X
	if r.cfg.KeepBest && r.best != nil {
		params = r.best
	} else {
		r.bestIter = out.Iterations
	}
	for i, v := range params {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%w: param %d is %v after %s: refusing to build a model: %w", ErrNotFiniteParams, i, v, out.Status, runErr)
		}
	}
	return params, nil
}

// buildModel returns the model of params with the run's encoder and a
// summary of the optimizer's result out (method, its figures, the seconds
// since start, the training cost and accuracy); its holdout and
// calibration figures are NaN until measureHoldout.
func (r *run) buildModel(method optim.Method, out optim.Result, params []float64, start time.Time) (*nn.Model, error) {
	model, err := nn.NewModel(r.prep.Spec, params, r.prep.Encoder, r.set.Classes)
	if err != nil {
		return nil, err
	}
	if err := model.SetLabel(r.set.Label); err != nil {
		return nil, err
	}
	sm := nn.Summary{
		Method:       methodName(method),
		Iterations:   out.Iterations,
		Evaluations:  out.Evaluations,
		Elapsed:      time.Since(start),
		Status:       out.Status,
		Cost:         r.obj.Eval(nil, params),
		TrainRows:    r.set.Rows(),
		Seed:         r.seed,
		Library:      nn.Version,
		ClassWeights: r.weights,
	}
	ts, err := fit.NewScorer(r.net, r.prep.X, r.set, r.cfg.Workers)
	if err != nil {
		return nil, fmt.Errorf("train: training rows: %w", err)
	}
	r.train = ts
	sm.TrainAccuracy = ts.Accuracy(params)
	sm.HoldoutCost, sm.HoldoutAccuracy = math.NaN(), math.NaN()
	noDecision(&sm)
	model.SetSummary(sm)
	return model, nil
}

// measureHoldout records the holdout figures of params in the model's
// summary and fits its decision (temperature, thresholds) on the holdout
// rows; without a holdout it does nothing.
func (r *run) measureHoldout(model *nn.Model, params []float64) error {
	if r.hold == nil {
		return nil
	}
	sm := model.Summary()
	sm.HoldoutRows = r.cfg.Holdout.Rows()
	sm.HoldoutCost, sm.HoldoutAccuracy = r.hold.Measure(params)
	err := decide(model, &sm, params, r.prep.HoldoutX, r.cfg.Holdout, r.cfg)
	model.SetSummary(sm)
	return err
}
