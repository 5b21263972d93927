package diag

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"time"

	"gonum.org/v1/gonum/floats"

	"github.com/seine-ml/seine/data"
	trainfit "github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// ErrOptions is wrapped by errors in a CompareOptions, SweepOptions or
// CurveOptions, or in how it fits the spec and data.
var ErrOptions = errors.New("diag: bad configuration")

// DefaultBatch is the mini-batch size, in rows, that Compare gives momentum
// and Adam when neither the config nor the spec's train.batch sets one
// (common practice: small powers of two).
const DefaultBatch = train.DefaultBatch

// DefaultTarget is the default of CompareOptions.Target: a run reaches the
// target when its cost is within 1% of the best cost of its seed.
const DefaultTarget = 0.01

// Contender is one method in a comparison: a name for the table and the
// optim.Method value. The value is reused for every seed, one run after
// the other.
type Contender struct {
	Name   string
	Method optim.Method
}

// CompareOptions sets an optimizer comparison. Its zero value compares the
// five methods of spec.Optimizer on all rows, from one seed, with the
// spec's iteration limit.
type CompareOptions struct {
	// Optimizers are the methods to compare by name; for each seed each
	// gets a fresh method, as training would build it, with the spec's
	// train.rate and the seed (which seeds the shuffles of momentum and
	// Adam). nil with no
	// Methods means gd, cg, lbfgs, momentum, adam.
	Optimizers []spec.Optimizer
	// Methods are further contenders given as values, run after the
	// Optimizers. Names must be distinct across both lists.
	Methods []Contender
	// Limits stop every run alike. A zero Iterations takes the spec's
	// train.iterations (then optim's default of 10,000); a zero GradTol
	// the spec's train.tolerance (then optim's 1e-6). Limits.Observer, when
	// set, is called after Compare's own observer.
	Limits optim.Limits
	// Batch is the mini-batch size in rows of momentum and Adam; 0 takes
	// the spec's train.batch, and when that is 0 too, DefaultBatch.
	// Negative is an error.
	Batch int
	// Seeds is the number of repetitions K ≥ 0 of the whole comparison,
	// each from fresh initial params; 0 means 1.
	Seeds int
	// Seed is the first initialisation seed; repetition k uses Seed + k.
	// 0 means the spec's init.seed. The holdout split always uses the
	// first seed, so every run sees the same rows.
	Seed uint64
	// Holdout is the fraction of rows, in [0, 1), kept out of training
	// (a stratified split by data.Split) and scored after every iteration;
	// 0 means none.
	Holdout float64
	// Target is the fraction f ≥ 0 that defines the target cost of a seed
	// as c* + f·|c*|, with c* the lowest cost any method reached on that
	// seed; 0 means DefaultTarget.
	Target float64
	// NoScale leaves the features as they are instead of standardising
	// them (the scaler is fitted on the training rows only otherwise).
	NoScale bool
	// Workers bounds the goroutines of one evaluation; 0 means GOMAXPROCS.
	// Costs are bit-identical whatever it is; times are not.
	Workers int
	// Shard, when set, runs only that part of the comparison's runs (see
	// Shard); the zero value runs them all.
	Shard Shard
	// Progress, when not nil, is called after every run.
	Progress func(FitDone)
}

// TracePoint is one iteration of one run.
type TracePoint struct {
	Iter int // 1 for the first iteration (epoch for momentum and Adam)
	// Evaluations so far, counted as optim.Minimize counts them: a pass
	// over all m training rows counts 1, a batch of b rows b/m.
	Evaluations float64
	// Elapsed is the wall time since the run started, without the time
	// spent in Compare's observer (holdout scoring, the full cost of batch
	// methods).
	Elapsed time.Duration
	// Cost is the full training cost J(x_k), penalty included, in nats.
	// For momentum and Adam it is computed by the observer after each
	// epoch over all training rows, outside the count and the clock
	// (optim reports only batch estimates for them).
	Cost     float64
	GradNorm float64 // ‖∇J(x_k)‖₂ over all training rows
	// HoldoutCost (mean cross-entropy, no penalty) and HoldoutAccuracy
	// (share of holdout rows classified right) at x_k; NaN without a
	// holdout.
	HoldoutCost, HoldoutAccuracy float64
}

// Run is one method from one seed.
type Run struct {
	Method string
	Seed   uint64
	Trace  []TracePoint
	// Cost is the full training cost at the point the run returns (for
	// GD, CG and L-BFGS the iterate of lowest cost; for momentum and Adam
	// the last one), or at the start if no iteration completed.
	Cost        float64
	Evaluations float64 // as in TracePoint
	Iterations  int
	Elapsed     time.Duration // as in TracePoint, for the whole run
	Status      optim.Status
	// HoldoutCost and HoldoutAccuracy at the returned point; NaN without
	// a holdout.
	HoldoutCost, HoldoutAccuracy float64
	// EvalsToTarget and SecondsToTarget (Elapsed in seconds) are read at
	// the first trace point whose cost is at or below the seed's target
	// cost; +Inf when the run never reached it.
	EvalsToTarget, SecondsToTarget float64
}

// Spread is the median and range of a figure over seeds.
type Spread struct {
	Median, Min, Max float64
}

// MethodSummary gathers the runs of one method over the seeds.
type MethodSummary struct {
	Method      string
	Cost        Spread // final training cost (nats)
	Evaluations Spread
	Iterations  Spread
	Seconds     Spread
	// EvalsToTarget and SecondsToTarget are over the seeds on which the
	// method reached the target (NaN when it never did); Reached counts
	// those seeds.
	EvalsToTarget, SecondsToTarget Spread
	Reached                        int
	HoldoutAccuracy                Spread // NaN without a holdout
	// Statuses counts the final statuses, in order of first appearance.
	Statuses []StatusCount
}

// StatusCount is how many runs stopped with one status.
type StatusCount struct {
	Status optim.Status
	Runs   int
}

// Comparison is the outcome of Compare.
type Comparison struct {
	Methods []string // in table order
	Seeds   []uint64 // initialisation seed of each repetition
	// Runs[i][k] is method i from seed k.
	Runs [][]Run
	// Best[k] is the lowest cost any method reached from seed k, and
	// Targets[k] = Best[k] + Target·|Best[k]|.
	Best, Targets []float64
	Target        float64 // the fraction used
	Summary       []MethodSummary
	// TrainRows and HoldoutRows are the rows each run trained on and was
	// scored on (0 without a holdout).
	TrainRows, HoldoutRows int
	Batch                  int      // mini-batch rows of momentum and Adam
	Warnings               []string // the scaler's, e.g. constant columns
	// Shard is the part of the comparison this result holds; the zero
	// value means the whole comparison. In a part, Seeds lists every seed
	// of the whole comparison and Runs[i] only the part's runs of method
	// i, by seed; Best, Targets and Summary are nil and the runs' figures
	// to target unset until MergeComparisons puts the parts together.
	Shard Shard
}

// Compare runs every method of cfg on the net that s describes and the
// rows of set, from the same initial params for a given seed (Net.Init
// with that seed), on the same objective: the same training rows, scaled
// alike, and the same holdout. Each method minimises the penalised
// cross-entropy J of package nn under the same Limits.
//
// Runs that diverge or whose line search fails are recorded with their
// status and do not stop the comparison. Compare checks ctx between runs
// and inside each run (through optim.Minimize); when it is cancelled it
// returns the comparison so far (complete seeds only, or nil if none) and
// an error wrapping ctx.Err() (nil for a shard).
//
// The runs are enumerated seed × method: run i = k·M + j is method j (of
// M, in table order) from seed k. cfg.Shard selects a part of them.
func Compare(ctx context.Context, s *spec.Network, set *data.Set, cfg CompareOptions) (*Comparison, error) {
	if s == nil || set == nil {
		return nil, fmt.Errorf("%w: nil spec or data set", ErrOptions)
	}
	if err := checkCompareConfig(&cfg); err != nil {
		return nil, err
	}
	if err := trainfit.CheckSpec(s); err != nil {
		return nil, err
	}
	if err := checkSet(s, set); err != nil {
		return nil, err
	}
	if err := cfg.Shard.check(); err != nil {
		return nil, err
	}
	names, err := contenderNames(cfg)
	if err != nil {
		return nil, err
	}
	seed0 := cfg.Seed
	if seed0 == 0 {
		seed0 = s.Init.Seed
	}
	lim, batch := trainfit.Defaults(s, cfg.Limits, cfg.Batch)
	if batch == 0 {
		batch = DefaultBatch
	}

	trainSet, holdSet := set, (*data.Set)(nil)
	if cfg.Holdout > 0 {
		if trainSet, holdSet, err = data.Split(set, cfg.Holdout, seed0); err != nil {
			return nil, fmt.Errorf("diag: holdout split: %w", err)
		}
	}
	p, err := newProblem(s, trainSet, holdSet, cfg.NoScale, batch, cfg.Workers)
	if err != nil {
		return nil, err
	}
	defer p.close()
	net := p.net
	seeds := make([]uint64, cfg.Seeds)
	for k := range seeds {
		seeds[k] = seed0 + uint64(k)
	}
	c := &Comparison{
		Methods:   names,
		Runs:      make([][]Run, len(names)),
		Target:    cfg.Target,
		TrainRows: trainSet.Rows(),
		Batch:     batch,
		Warnings:  p.warn,
	}
	if holdSet != nil {
		c.HoldoutRows = holdSet.Rows()
	}
	x0 := make([]float64, net.NumParams())
	sharded := !cfg.Shard.Whole()
	if sharded {
		c.Shard = cfg.Shard
		c.Seeds = seeds
	}
	total, done, start := cfg.Shard.Count(len(seeds)*len(names)), 0, time.Now()
	for k, seed := range seeds {
		net.Init(x0, seed)
		runs := make([]Run, len(names))
		for i := range names {
			idx := k*len(names) + i
			if !cfg.Shard.has(idx) {
				continue
			}
			if err := ctx.Err(); err != nil {
				if sharded {
					return nil, fmt.Errorf("diag: compare: %w", err)
				}
				return c.finish(), fmt.Errorf("diag: compare: %w", err)
			}
			m, batched, err := contender(cfg, i, s, seed)
			if err != nil {
				return nil, err
			}
			r, err := p.run(ctx, m, batched, x0, lim)
			if err != nil {
				if !sharded && (errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)) {
					return c.finish(), fmt.Errorf("diag: compare: %s, seed %d: %w", names[i], seed, err)
				}
				return nil, fmt.Errorf("diag: compare: %s, seed %d: %w", names[i], seed, err)
			}
			r.Method, r.Seed = names[i], seed
			if sharded {
				c.Runs[i] = append(c.Runs[i], r)
			} else {
				runs[i] = r
			}
			done++
			if cfg.Progress != nil {
				cfg.Progress(FitDone{Index: idx, Done: done, Total: total, Method: names[i], Seed: seed, Rows: c.TrainRows, Elapsed: time.Since(start)})
			}
		}
		if sharded {
			continue
		}
		for i := range names {
			c.Runs[i] = append(c.Runs[i], runs[i])
		}
		c.Seeds = append(c.Seeds, seed)
	}
	if sharded {
		return c, nil
	}
	return c.finish(), nil
}

// MergeComparisons puts the parts of a sharded comparison back together:
// parts must hold each shard 0 … N−1 of one N exactly once, all of the
// same comparison (methods, seeds, target, rows, batch and warnings; that
// they come from the same spec, data and settings is for the caller to
// check). The result equals the whole comparison's, bit for bit, wall
// times aside. Errors wrap ErrOptions; one that blames a part is a
// *PartError, which names it by its index in parts.
func MergeComparisons(parts []*Comparison) (*Comparison, error) {
	if err := checkShards(parts, func(p *Comparison) Shard { return p.Shard }); err != nil {
		return nil, err
	}
	p0 := parts[0]
	M, S := len(p0.Methods), len(p0.Seeds)
	c := &Comparison{
		Methods: slices.Clone(p0.Methods), Seeds: slices.Clone(p0.Seeds), Runs: make([][]Run, M),
		Target: p0.Target, TrainRows: p0.TrainRows, HoldoutRows: p0.HoldoutRows, Batch: p0.Batch,
		Warnings: slices.Clone(p0.Warnings),
	}
	if M == 0 || S == 0 {
		return nil, partErrorf(0, "%s has %d methods and %d seeds", partRef(0), M, S)
	}
	have := make([]bool, M*S)
	for i := range c.Runs {
		c.Runs[i] = make([]Run, S)
	}
	for pi, p := range parts {
		if !slices.Equal(p.Methods, c.Methods) || !slices.Equal(p.Seeds, c.Seeds) || p.Target != c.Target ||
			p.TrainRows != c.TrainRows || p.HoldoutRows != c.HoldoutRows || p.Batch != c.Batch || !slices.Equal(p.Warnings, c.Warnings) {
			return nil, partErrorf(pi, "%s is another comparison than %s (methods, seeds, target, rows, batch or warnings differ)", partRef(pi), partRef(0))
		}
		if len(p.Runs) != M {
			return nil, partErrorf(pi, "%s has runs of %d methods, want %d", partRef(pi), len(p.Runs), M)
		}
		n := 0
		for i, runs := range p.Runs {
			for _, r := range runs {
				k := slices.Index(c.Seeds, r.Seed)
				idx := k*M + i
				if r.Method != c.Methods[i] || k < 0 || !p.Shard.has(idx) || have[idx] {
					return nil, partErrorf(pi, "%s (shard %s): run of %s from seed %d does not belong there or is given twice",
						partRef(pi), p.Shard, r.Method, r.Seed)
				}
				have[idx] = true
				c.Runs[i][k] = r
				n++
			}
		}
		if want := p.Shard.Count(M * S); n != want {
			return nil, partErrorf(pi, "%s (shard %s) holds %d runs, want %d", partRef(pi), p.Shard, n, want)
		}
	}
	return c.finish(), nil
}

func checkCompareConfig(cfg *CompareOptions) error {
	switch {
	case cfg.Seeds < 0:
		return fmt.Errorf("%w: Seeds = %d, want ≥ 0", ErrOptions, cfg.Seeds)
	case cfg.Batch < 0:
		return fmt.Errorf("%w: Batch = %d, want ≥ 0", ErrOptions, cfg.Batch)
	case cfg.Workers < 0:
		return fmt.Errorf("%w: Workers = %d, want ≥ 0", ErrOptions, cfg.Workers)
	case !(cfg.Holdout >= 0 && cfg.Holdout < 1):
		return fmt.Errorf("%w: Holdout = %g, want a fraction in [0, 1)", ErrOptions, cfg.Holdout)
	case !(cfg.Target >= 0) || math.IsInf(cfg.Target, 1):
		return fmt.Errorf("%w: Target = %g, want a finite fraction ≥ 0", ErrOptions, cfg.Target)
	}
	if cfg.Seeds == 0 {
		cfg.Seeds = 1
	}
	if cfg.Target == 0 {
		cfg.Target = DefaultTarget
	}
	if cfg.Optimizers == nil && cfg.Methods == nil {
		cfg.Optimizers = []spec.Optimizer{spec.GD, spec.CG, spec.LBFGS, spec.Momentum, spec.Adam}
	}
	return nil
}

// contenderNames lists the table names of cfg's methods and checks that
// they are distinct and known.
func contenderNames(cfg CompareOptions) ([]string, error) {
	var names []string
	for i, o := range cfg.Optimizers {
		if _, err := trainfit.MethodFor(o, 0, 0); err != nil || o == 0 {
			return nil, fmt.Errorf("%w: Optimizers[%d] = %d is not a known optimizer", ErrOptions, i, int(o))
		}
		names = append(names, o.String())
	}
	for i, m := range cfg.Methods {
		if m.Method == nil {
			return nil, fmt.Errorf("%w: Methods[%d] (%q) has a nil Method", ErrOptions, i, m.Name)
		}
		if m.Name == "" {
			return nil, fmt.Errorf("%w: Methods[%d] has no name", ErrOptions, i)
		}
		names = append(names, m.Name)
	}
	for i, n := range names {
		if slices.Index(names, n) != i {
			return nil, fmt.Errorf("%w: method %q given twice", ErrOptions, n)
		}
	}
	return names, nil
}

// contender returns method i of cfg for a seed, and whether it works on
// mini-batches.
func contender(cfg CompareOptions, i int, s *spec.Network, seed uint64) (optim.Method, bool, error) {
	var m optim.Method
	if i < len(cfg.Optimizers) {
		var err error
		if m, err = trainfit.MethodFor(cfg.Optimizers[i], s.Train.Rate, seed); err != nil {
			return nil, false, err
		}
	} else {
		m = cfg.Methods[i-len(cfg.Optimizers)].Method
	}
	switch m.(type) {
	case *optim.Momentum, *optim.Adam:
		return m, true, nil
	}
	return m, false, nil
}

// checkSet reports how set does not fit the net (see trainfit.CheckSet).
func checkSet(s *spec.Network, set *data.Set) error {
	if err := trainfit.CheckSet(s, set, "data"); err != nil {
		return fmt.Errorf("%w: %w", ErrOptions, err)
	}
	return nil
}

// problem holds the objectives every run of a comparison shares.
type problem struct {
	net     *nn.Net
	full    *nn.Objective    // all training rows, one batch
	batched *nn.Objective    // the same rows in mini-batches
	hold    *trainfit.Scorer // nil without a holdout
	grad    []float64
	warn    []string
}

// close stops the goroutines of p's objectives.
func (p *problem) close() {
	p.full.Close()
	p.batched.Close()
	if p.hold != nil {
		p.hold.Close()
	}
}

func newProblem(s *spec.Network, trainSet, holdSet *data.Set, noScale bool, batch, workers int) (*problem, error) {
	prep, err := trainfit.Prepare(s, trainSet, holdSet, noScale)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrOptions, err)
	}
	x, hx, warn := prep.X, prep.HoldoutX, prep.Warnings
	net, err := nn.Compile(prep.Spec)
	if err != nil {
		return nil, err
	}
	weights, wwarn := trainfit.ClassWeights(s, trainSet)
	warn = append(warn, wwarn...)
	full, err := nn.NewObjective(net, x, trainSet.Y, nn.ObjectiveOptions{Workers: workers, ClassWeights: weights})
	if err != nil {
		return nil, fmt.Errorf("diag: training rows: %w", err)
	}
	batched, err := nn.NewObjective(net, x, trainSet.Y, nn.ObjectiveOptions{Batch: batch, Workers: workers, ClassWeights: weights})
	if err != nil {
		full.Close() // its goroutines must not outlive the failed call
		return nil, fmt.Errorf("diag: training rows: %w", err)
	}
	p := &problem{net: net, full: full, batched: batched, grad: make([]float64, net.NumParams()), warn: warn}
	if holdSet != nil {
		if p.hold, err = trainfit.NewScorer(net, hx, holdSet, workers); err != nil {
			p.close()
			return nil, fmt.Errorf("diag: holdout rows: %w", err)
		}
	}
	return p, nil
}

// run minimises from x0 with m and records the trace. Time spent in the
// observer is taken off the clock.
func (p *problem) run(ctx context.Context, m optim.Method, batched bool, x0 []float64, lim optim.Limits) (Run, error) {
	var obj optim.Objective = p.full
	if batched {
		obj = p.batched
	}
	var r Run
	var excluded time.Duration
	user := lim.Observer
	lim.Observer = func(st optim.Step, xk []float64) bool {
		t0 := time.Now()
		tp := TracePoint{
			Iter: st.Iter, Evaluations: st.Evaluations, Elapsed: st.Elapsed - excluded,
			Cost: st.Cost, GradNorm: st.GradNorm, HoldoutCost: math.NaN(), HoldoutAccuracy: math.NaN(),
		}
		if batched {
			tp.Cost = p.full.Eval(p.grad, xk)
			tp.GradNorm = floats.Norm(p.grad, 2)
		}
		if p.hold != nil {
			tp.HoldoutCost, tp.HoldoutAccuracy = p.hold.Measure(xk)
		}
		r.Trace = append(r.Trace, tp)
		excluded += time.Since(t0)
		return user != nil && user(st, xk)
	}
	res, err := optim.Minimize(ctx, obj, x0, m, lim)
	if res.X == nil {
		return r, err
	}
	if err != nil && !errors.Is(err, optim.ErrDiverged) {
		return r, err
	}
	r.Cost = p.full.Eval(nil, res.X)
	if !batched && res.Iterations > 0 && !math.IsNaN(res.Cost) {
		r.Cost = res.Cost
	}
	r.Evaluations = res.Evaluations
	r.Iterations = res.Iterations
	r.Elapsed = max(res.Elapsed-excluded, 0)
	r.Status = res.Status
	r.HoldoutCost, r.HoldoutAccuracy = math.NaN(), math.NaN()
	if p.hold != nil {
		r.HoldoutCost, r.HoldoutAccuracy = p.hold.Measure(res.X)
	}
	return r, nil
}

// finish sets the targets of each seed, the figures to target and the
// summaries.
func (c *Comparison) finish() *Comparison {
	if len(c.Seeds) == 0 {
		return nil
	}
	c.Best = make([]float64, len(c.Seeds))
	c.Targets = make([]float64, len(c.Seeds))
	for k := range c.Seeds {
		best := math.Inf(1)
		for i := range c.Methods {
			r := &c.Runs[i][k]
			if finite(r.Cost) {
				best = math.Min(best, r.Cost)
			}
			for _, tp := range r.Trace {
				if finite(tp.Cost) {
					best = math.Min(best, tp.Cost)
				}
			}
		}
		c.Best[k] = best
		c.Targets[k] = best + c.Target*math.Abs(best)
		for i := range c.Methods {
			r := &c.Runs[i][k]
			r.EvalsToTarget, r.SecondsToTarget = math.Inf(1), math.Inf(1)
			for _, tp := range r.Trace {
				if tp.Cost <= c.Targets[k] {
					r.EvalsToTarget, r.SecondsToTarget = tp.Evaluations, tp.Elapsed.Seconds()
					break
				}
			}
		}
	}
	c.Summary = make([]MethodSummary, len(c.Methods))
	for i, name := range c.Methods {
		runs := c.Runs[i]
		pick := func(f func(r *Run) float64, reachedOnly bool) Spread {
			var v []float64
			for k := range runs {
				if reachedOnly && math.IsInf(runs[k].EvalsToTarget, 1) {
					continue
				}
				v = append(v, f(&runs[k]))
			}
			return spreadOf(v)
		}
		ms := MethodSummary{
			Method:          name,
			Cost:            pick(func(r *Run) float64 { return r.Cost }, false),
			Evaluations:     pick(func(r *Run) float64 { return r.Evaluations }, false),
			Iterations:      pick(func(r *Run) float64 { return float64(r.Iterations) }, false),
			Seconds:         pick(func(r *Run) float64 { return r.Elapsed.Seconds() }, false),
			EvalsToTarget:   pick(func(r *Run) float64 { return r.EvalsToTarget }, true),
			SecondsToTarget: pick(func(r *Run) float64 { return r.SecondsToTarget }, true),
			HoldoutAccuracy: pick(func(r *Run) float64 { return r.HoldoutAccuracy }, false),
		}
		for k := range runs {
			if !math.IsInf(runs[k].EvalsToTarget, 1) {
				ms.Reached++
			}
			j := slices.IndexFunc(ms.Statuses, func(sc StatusCount) bool { return sc.Status == runs[k].Status })
			if j < 0 {
				ms.Statuses = append(ms.Statuses, StatusCount{Status: runs[k].Status})
				j = len(ms.Statuses) - 1
			}
			ms.Statuses[j].Runs++
		}
		c.Summary[i] = ms
	}
	return c
}

// spreadOf returns the median, minimum and maximum of v, ignoring NaN; all
// NaN when nothing is left. The median of an even count is the mean of
// the middle two.
func spreadOf(v []float64) Spread {
	w := make([]float64, 0, len(v))
	for _, x := range v {
		if !math.IsNaN(x) {
			w = append(w, x)
		}
	}
	if len(w) == 0 {
		return Spread{math.NaN(), math.NaN(), math.NaN()}
	}
	slices.Sort(w)
	n := len(w)
	med := w[n/2]
	if n%2 == 0 {
		med = (w[n/2-1] + w[n/2]) / 2
	}
	return Spread{Median: med, Min: w[0], Max: w[n-1]}
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// MinSeconds is the clock resolution that times to target are clamped to
// before they enter a performance profile, which rejects a time of 0.
const MinSeconds = 1e-9

// ProfileTable returns the solvers and cost table that NewProfile takes,
// from one or more comparisons of the same methods (in the same order):
// one row per comparison and seed (each seed is a problem instance of its
// own), one column per method, each entry the evaluations (or, with
// byTime, the seconds, at least MinSeconds) the method needed to reach the
// seed's target cost, +Inf when it did not.
func ProfileTable(comps []*Comparison, byTime bool) (solvers []string, cost [][]float64, err error) {
	if len(comps) == 0 {
		return nil, nil, ErrNoProblems
	}
	for ci, c := range comps {
		if c == nil {
			return nil, nil, fmt.Errorf("%w: comparison %d is nil", ErrOptions, ci)
		}
		if ci == 0 {
			solvers = slices.Clone(c.Methods)
		} else if !slices.Equal(solvers, c.Methods) {
			return nil, nil, fmt.Errorf("%w: comparison %d has methods %v, the first %v", ErrOptions, ci, c.Methods, solvers)
		}
		for k := range c.Seeds {
			row := make([]float64, len(solvers))
			for i := range solvers {
				r := c.Runs[i][k]
				row[i] = r.EvalsToTarget
				if byTime {
					row[i] = r.SecondsToTarget
					if finite(row[i]) {
						row[i] = math.Max(row[i], MinSeconds)
					}
				}
			}
			cost = append(cost, row)
		}
	}
	return solvers, cost, nil
}

// Profiles returns the performance profiles (Dolan & Moré 2002) of the
// methods of comps by evaluations to target and by seconds to target; see
// ProfileTable for the table behind them.
func Profiles(comps []*Comparison) (byEvals, bySeconds *Profile, err error) {
	solvers, cost, err := ProfileTable(comps, false)
	if err != nil {
		return nil, nil, err
	}
	if byEvals, err = NewProfile(solvers, cost); err != nil {
		return nil, nil, err
	}
	_, cost, _ = ProfileTable(comps, true)
	if bySeconds, err = NewProfile(solvers, cost); err != nil {
		return nil, nil, err
	}
	return byEvals, bySeconds, nil
}
