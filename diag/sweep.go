package diag

import (
	"context"
	"errors"
	"fmt"
	"math"
	"time"

	"github.com/seine-ml/seine/data"
	trainfit "github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// DefaultFolds is the number of folds of a sweep when neither Folds nor
// Holdout is set (Kohavi 1995 found 10 or fewer stratified folds a good
// trade; 5 keeps the work small).
const DefaultFolds = 5

// SweepOptions sets a sweep. Its zero value runs 5-fold stratified
// cross-validation with the spec's optimizer and limits.
type SweepOptions struct {
	// Folds is the number k ≥ 2 of stratified folds (data.Folds); each
	// value is trained k times, each time validated on one fold. 0 means
	// DefaultFolds, unless Holdout is set.
	Folds int
	// Holdout, in (0, 1), replaces the folds by one stratified split
	// (data.Split) with this fraction of rows for validation; 0 means
	// folds. Setting both is an error.
	Holdout float64
	// Seed seeds the folds or the split and the initial params; 0 means
	// the spec's init.seed.
	Seed uint64
	// Method is the optimizer of every fit; nil means the spec's (see
	// train.Options.Method). Fits run one after the other, so one value
	// serves them all.
	Method optim.Method
	// Limits stop every fit, as in train.Options.Limits.
	Limits optim.Limits
	// NoScale trains on the features as they are (see train.Options).
	NoScale bool
	// Workers bounds the goroutines of one evaluation; 0 means GOMAXPROCS.
	Workers int
	// Shard, when set, runs only that part of the sweep's fits (see
	// Shard); the zero value runs them all.
	Shard Shard
	// Progress, when not nil, is called after every fit.
	Progress func(FitDone)
}

// SweepParam names what a sweep varies.
type SweepParam int

const (
	// PenaltyL2 varies the spec's penalty.l2, λ.
	PenaltyL2 SweepParam = iota
	// HiddenUnits varies the units of the first hidden layer.
	HiddenUnits
)

// String returns "l2" or "units".
func (p SweepParam) String() string {
	if p == HiddenUnits {
		return "units"
	}
	return "l2"
}

// Stat is a figure over the folds: its mean, its sample standard
// deviation (divisor k − 1; 0 for one fold) and its range.
type Stat struct {
	Mean, SD, Min, Max float64
}

// SweepPoint is the outcome at one value of the swept parameter.
type SweepPoint struct {
	Lambda float64 // penalty strength λ of these fits
	Units  int     // units of the first hidden layer; 0 without one
	// TrainCost is the mean cross-entropy on the training rows of each
	// fit, without the penalty (so that it reads on the same scale as
	// HoldoutCost); HoldoutCost the same on the rows each fit held out
	// (its validation fold, or the holdout). Both in nats.
	TrainCost, HoldoutCost Stat
	// TrainAccuracy and HoldoutAccuracy are shares of rows classified
	// right.
	TrainAccuracy, HoldoutAccuracy Stat
}

// Sweep is the outcome of SweepPenalty or SweepUnits.
type Sweep struct {
	Param  SweepParam
	Points []SweepPoint // in the order of the values given
	// Best is the index in Points of the lowest mean validation cost (the
	// first on ties).
	Best int
	// Folds is the number of fits per value: k, or 1 with a holdout.
	Folds   int
	Holdout float64 // the holdout fraction, or 0 with folds
	// Warnings are those of the fits (each text once, in the order of the
	// fits).
	Warnings []string
	// Fits holds every fit that ran, in the sweep's order: fit i trained
	// value i / Folds and validated on fold i mod Folds.
	Fits []SweepFit
	// Size is the number of fits of the whole sweep: values × Folds.
	Size int
	// Shard is the part of the sweep this result holds; the zero value
	// means the whole sweep. A part holds Fits, Warnings and the settings
	// above only: Points is nil until MergeSweeps puts the parts together.
	Shard Shard
}

// SweepFit is one fit of a sweep.
type SweepFit struct {
	Index int // place in the sweep's order
	Value int // index of the value in the list swept
	Fold  int // 0-based fold validated on (0 with a holdout)
	// Lambda and Units are the fit's penalty strength and first hidden
	// layer's units (0 without one).
	Lambda float64
	Units  int
	// Costs and accuracies as in SweepPoint, of this fit alone.
	TrainCost, HoldoutCost, TrainAccuracy, HoldoutAccuracy float64
	Warnings                                               []string
}

// SweepPenalty trains the net that s describes at each penalty strength
// λ of lambdas (spec penalty.l2; every other setting as in s) on the
// parts of set that cfg describes, and reports training and validation
// cost and accuracy at each. The same folds and initial params serve
// every λ. It checks ctx between fits and returns ctx.Err() wrapped when
// cancelled.
//
// The fits are enumerated value × fold: fit i = v·k + f trains value v
// (in the order given) and validates on fold f of k (k = 1 with a
// holdout). cfg.Shard selects a part of them.
func SweepPenalty(ctx context.Context, s *spec.Network, set *data.Set, lambdas []float64, cfg SweepOptions) (*Sweep, error) {
	if s == nil {
		return nil, fmt.Errorf("%w: nil spec", ErrOptions)
	}
	if len(lambdas) == 0 {
		return nil, fmt.Errorf("%w: no penalty strengths to sweep", ErrOptions)
	}
	specs := make([]*spec.Network, len(lambdas))
	for i, l := range lambdas {
		if !(l >= 0) || math.IsInf(l, 1) {
			return nil, fmt.Errorf("%w: penalty strength %d is %g, want finite and ≥ 0", ErrOptions, i+1, l)
		}
		specs[i] = s.Clone()
		specs[i].Penalty.L2 = l
	}
	return sweep(ctx, PenaltyL2, specs, set, cfg)
}

// SweepUnits is SweepPenalty varying the number of units of the first
// hidden layer instead, at the spec's λ. The spec must have a hidden
// layer.
func SweepUnits(ctx context.Context, s *spec.Network, set *data.Set, units []int, cfg SweepOptions) (*Sweep, error) {
	if s == nil {
		return nil, fmt.Errorf("%w: nil spec", ErrOptions)
	}
	if len(s.Hidden) == 0 {
		return nil, fmt.Errorf("%w: the spec has no hidden layer whose units could vary", ErrOptions)
	}
	if len(units) == 0 {
		return nil, fmt.Errorf("%w: no unit counts to sweep", ErrOptions)
	}
	specs := make([]*spec.Network, len(units))
	for i, u := range units {
		if u < 1 {
			return nil, fmt.Errorf("%w: unit count %d is %d, want ≥ 1", ErrOptions, i+1, u)
		}
		specs[i] = s.Clone()
		specs[i].Hidden[0].Units = u
	}
	return sweep(ctx, HiddenUnits, specs, set, cfg)
}

func sweep(ctx context.Context, param SweepParam, specs []*spec.Network, set *data.Set, cfg SweepOptions) (*Sweep, error) {
	if set == nil {
		return nil, fmt.Errorf("%w: nil data set", ErrOptions)
	}
	switch {
	case cfg.Folds != 0 && cfg.Holdout != 0:
		return nil, fmt.Errorf("%w: both Folds (%d) and Holdout (%g) are set; choose one", ErrOptions, cfg.Folds, cfg.Holdout)
	case cfg.Folds < 0 || cfg.Folds == 1:
		return nil, fmt.Errorf("%w: Folds = %d, want ≥ 2 (or 0 for %d)", ErrOptions, cfg.Folds, DefaultFolds)
	case cfg.Holdout != 0 && !(cfg.Holdout > 0 && cfg.Holdout < 1):
		return nil, fmt.Errorf("%w: Holdout = %g, want a fraction in (0, 1)", ErrOptions, cfg.Holdout)
	}
	for _, sp := range specs {
		if err := trainfit.CheckSpec(sp); err != nil {
			return nil, err
		}
		if err := checkSet(sp, set); err != nil {
			return nil, err
		}
	}
	if err := cfg.Shard.check(); err != nil {
		return nil, err
	}
	seed := cfg.Seed
	if seed == 0 {
		seed = specs[0].Init.Seed
	}
	// parts[f] = (training rows, validation rows) of fit f.
	var parts [][2][]int
	if cfg.Holdout > 0 {
		tr, ho, err := data.SplitIndices(set, cfg.Holdout, seed)
		if err != nil {
			return nil, fmt.Errorf("diag: sweep: holdout split: %w", err)
		}
		parts = [][2][]int{{tr, ho}}
	} else {
		k := cfg.Folds
		if k == 0 {
			k = DefaultFolds
		}
		folds, err := data.Folds(set, k, seed)
		if err != nil {
			return nil, fmt.Errorf("diag: sweep: %d folds of %d rows: %w", k, set.Rows(), err)
		}
		for f := range folds {
			parts = append(parts, [2][]int{data.TrainRows(folds, f), folds[f]})
		}
	}
	nf := len(parts)
	sw := &Sweep{Param: param, Folds: nf, Holdout: cfg.Holdout, Size: len(specs) * nf, Shard: cfg.Shard}
	fc := fitConfig{method: cfg.Method, limits: cfg.Limits, noScale: cfg.NoScale, workers: cfg.Workers, seed: seed}
	total, start := cfg.Shard.Count(sw.Size), time.Now()
	for v, sp := range specs {
		units := 0
		if len(sp.Hidden) > 0 {
			units = sp.Hidden[0].Units
		}
		for f, pt := range parts {
			idx := v*nf + f
			if !cfg.Shard.has(idx) {
				continue
			}
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("diag: sweep: %w", err)
			}
			r, err := fit(ctx, sp, set.Subset(pt[0]), set.Subset(pt[1]), fc)
			if err != nil {
				return nil, fmt.Errorf("diag: sweep at %s = %s: %w", param, valueOf(param, sp), err)
			}
			sw.Fits = append(sw.Fits, SweepFit{
				Index: idx, Value: v, Fold: f, Lambda: sp.Penalty.L2, Units: units,
				TrainCost: r.trainCost, HoldoutCost: r.validCost, TrainAccuracy: r.trainAcc, HoldoutAccuracy: r.validAcc,
				Warnings: r.warn,
			})
			sw.Warnings = appendNew(sw.Warnings, r.warn...)
			if cfg.Progress != nil {
				cfg.Progress(FitDone{
					Index: idx, Done: len(sw.Fits), Total: total, Lambda: sp.Penalty.L2, Units: units,
					Fold: f, Folds: nf, Rows: len(pt[0]), Elapsed: time.Since(start),
				})
			}
		}
	}
	if cfg.Shard.Whole() {
		sw.summarise()
	}
	return sw, nil
}

// summarise sets the points, the best and the warnings of a sweep from its
// fits, which must be all of them in order.
func (sw *Sweep) summarise() {
	sw.Points, sw.Best, sw.Warnings = nil, 0, nil
	for i := 0; i < len(sw.Fits); i += sw.Folds {
		var tc, vc, ta, va []float64
		for _, f := range sw.Fits[i : i+sw.Folds] {
			tc, vc = append(tc, f.TrainCost), append(vc, f.HoldoutCost)
			ta, va = append(ta, f.TrainAccuracy), append(va, f.HoldoutAccuracy)
			sw.Warnings = appendNew(sw.Warnings, f.Warnings...)
		}
		f := sw.Fits[i]
		sw.Points = append(sw.Points, SweepPoint{
			Lambda: f.Lambda, Units: f.Units, TrainCost: statOf(tc), HoldoutCost: statOf(vc),
			TrainAccuracy: statOf(ta), HoldoutAccuracy: statOf(va),
		})
		if p := len(sw.Points) - 1; sw.Points[p].HoldoutCost.Mean < sw.Points[sw.Best].HoldoutCost.Mean {
			sw.Best = p
		}
	}
}

// MergeSweeps puts the parts of a sharded sweep back together: parts must
// hold each shard 0 … N−1 of one N exactly once, all of the same sweep
// (parameter, folds, holdout and size; that they come from the same spec,
// data and settings is for the caller to check). The result equals the
// whole sweep's, bit for bit. Errors wrap ErrOptions; one that blames a
// part is a *PartError, which names it by its index in parts.
func MergeSweeps(parts []*Sweep) (*Sweep, error) {
	if err := checkShards(parts, func(p *Sweep) Shard { return p.Shard }); err != nil {
		return nil, err
	}
	p0 := parts[0]
	if p0.Folds < 1 || p0.Size < 0 || p0.Size%p0.Folds != 0 {
		return nil, partErrorf(0, "%s: %d fits in folds of %d", partRef(0), p0.Size, p0.Folds)
	}
	sw := &Sweep{Param: p0.Param, Folds: p0.Folds, Holdout: p0.Holdout, Size: p0.Size, Fits: make([]SweepFit, p0.Size)}
	have := make([]bool, p0.Size)
	for i, p := range parts {
		if p.Param != sw.Param || p.Folds != sw.Folds || p.Holdout != sw.Holdout || p.Size != sw.Size {
			return nil, partErrorf(i, "%s is a sweep of %s over %d fits (%d folds, holdout %g), %s of %s over %d (%d folds, holdout %g)",
				partRef(i), p.Param, p.Size, p.Folds, p.Holdout, partRef(0), sw.Param, sw.Size, sw.Folds, sw.Holdout)
		}
		if len(p.Fits) != p.Shard.Count(p.Size) {
			return nil, partErrorf(i, "%s (shard %s) holds %d fits, want %d", partRef(i), p.Shard, len(p.Fits), p.Shard.Count(p.Size))
		}
		for _, f := range p.Fits {
			if f.Index < 0 || f.Index >= sw.Size || !p.Shard.has(f.Index) || have[f.Index] ||
				f.Value != f.Index/sw.Folds || f.Fold != f.Index%sw.Folds {
				return nil, partErrorf(i, "%s (shard %s): fit %d (value %d, fold %d) does not belong there or is given twice",
					partRef(i), p.Shard, f.Index, f.Value, f.Fold)
			}
			have[f.Index] = true
			sw.Fits[f.Index] = f
		}
	}
	for v := 0; v < sw.Size; v += sw.Folds {
		for _, f := range sw.Fits[v : v+sw.Folds] {
			if f.Lambda != sw.Fits[v].Lambda && !(math.IsNaN(f.Lambda) && math.IsNaN(sw.Fits[v].Lambda)) || f.Units != sw.Fits[v].Units {
				return nil, fmt.Errorf("%w: fit %d has λ = %g and %d units, fit %d of the same value λ = %g and %d units",
					ErrOptions, f.Index, f.Lambda, f.Units, v, sw.Fits[v].Lambda, sw.Fits[v].Units)
			}
		}
	}
	sw.summarise()
	return sw, nil
}

func valueOf(p SweepParam, s *spec.Network) string {
	if p == HiddenUnits {
		return fmt.Sprint(s.Hidden[0].Units)
	}
	return fmt.Sprint(s.Penalty.L2)
}

func appendNew(dst []string, v ...string) []string {
	for _, s := range v {
		found := false
		for _, d := range dst {
			found = found || d == s
		}
		if !found {
			dst = append(dst, s)
		}
	}
	return dst
}

// statOf returns the mean, sample SD and range of v (non-empty).
func statOf(v []float64) Stat {
	st := Stat{Min: math.Inf(1), Max: math.Inf(-1)}
	for _, x := range v {
		st.Mean += x
		st.Min, st.Max = math.Min(st.Min, x), math.Max(st.Max, x)
	}
	st.Mean /= float64(len(v))
	if len(v) > 1 {
		var ss float64
		for _, x := range v {
			ss += (x - st.Mean) * (x - st.Mean)
		}
		st.SD = math.Sqrt(ss / float64(len(v)-1))
	}
	return st
}

// fitConfig is what sweeps and curves pass to every fit.
type fitConfig struct {
	method  optim.Method
	limits  optim.Limits
	noScale bool
	workers int
	seed    uint64
}

// fitted holds the figures of one fit.
type fitted struct {
	trainCost, validCost float64 // mean cross-entropy, no penalty (nats)
	trainAcc, validAcc   float64
	warn                 []string
}

// fit trains s on tr and scores the model on tr and va.
func fit(ctx context.Context, s *spec.Network, tr, va *data.Set, fc fitConfig) (fitted, error) {
	res, err := train.Train(ctx, s, tr, train.Options{
		Method: fc.method, Limits: fc.limits, NoScale: fc.noScale, Seed: fc.seed, Workers: fc.workers,
	})
	if err != nil && (errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)) {
		return fitted{}, err
	}
	if res == nil || res.Model == nil {
		return fitted{}, err
	}
	m := res.Model
	net := m.Net()
	var out fitted
	out.warn = res.Warnings
	for _, part := range []struct {
		set       *data.Set
		cost, acc *float64
	}{{tr, &out.trainCost, &out.trainAcc}, {va, &out.validCost, &out.validAcc}} {
		x, err := m.Encoder().EncodeSet(part.set)
		if err != nil {
			return fitted{}, fmt.Errorf("%w: %w", ErrOptions, err)
		}
		scr, err := trainfit.NewScorer(net, x, part.set, fc.workers)
		if err != nil {
			return fitted{}, err
		}
		*part.cost, *part.acc = scr.Measure(m.Params())
		scr.Close()
	}
	return out, nil
}
