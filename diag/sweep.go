package diag

import (
	"context"
	"errors"
	"fmt"
	"math"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// DefaultFolds is the number of folds of a sweep when neither Folds nor
// Holdout is set (Kohavi 1995 found 10 or fewer stratified folds a good
// trade; 5 keeps the work small).
const DefaultFolds = 5

// SweepConfig sets a sweep. Its zero value runs 5-fold stratified
// cross-validation with the spec's optimizer and limits.
type SweepConfig struct {
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
	// train.Config.Method). Fits run one after the other, so one value
	// serves them all.
	Method optim.Method
	// Limits stop every fit, as in train.Config.Limits.
	Limits optim.Limits
	// NoScale trains on the features as they are (see train.Config).
	NoScale bool
	// Workers bounds the goroutines of one evaluation; 0 means GOMAXPROCS.
	Workers int
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
	// ValidCost); ValidCost the same on the validation rows. Both in nats.
	TrainCost, ValidCost Stat
	// TrainAccuracy and ValidAccuracy are shares of rows classified
	// right.
	TrainAccuracy, ValidAccuracy Stat
}

// Sweep is the outcome of SweepPenalty or SweepUnits.
type Sweep struct {
	Param  SweepParam
	Points []SweepPoint // in the order of the values given
	// Best is the index in Points of the lowest mean validation cost (the
	// first on ties).
	Best int
	// Folds is the number of fits per value: k, or 1 with a holdout.
	Folds    int
	Holdout  float64 // the holdout fraction, or 0 with folds
	Warnings []string
}

// SweepPenalty trains the net that s describes at each penalty strength
// λ of lambdas (spec penalty.l2; every other setting as in s) on the
// parts of set that cfg describes, and reports training and validation
// cost and accuracy at each. The same folds and initial params serve
// every λ. It checks ctx between fits and returns ctx.Err() wrapped when
// cancelled.
func SweepPenalty(ctx context.Context, s *spec.Network, set *data.Set, lambdas []float64, cfg SweepConfig) (*Sweep, error) {
	if s == nil {
		return nil, fmt.Errorf("%w: nil spec", ErrConfig)
	}
	if len(lambdas) == 0 {
		return nil, fmt.Errorf("%w: no penalty strengths to sweep", ErrConfig)
	}
	specs := make([]*spec.Network, len(lambdas))
	for i, l := range lambdas {
		if !(l >= 0) || math.IsInf(l, 1) {
			return nil, fmt.Errorf("%w: penalty strength %d is %g, want finite and ≥ 0", ErrConfig, i+1, l)
		}
		specs[i] = s.Clone()
		specs[i].Penalty.L2 = l
	}
	return sweep(ctx, PenaltyL2, specs, set, cfg)
}

// SweepUnits is SweepPenalty varying the number of units of the first
// hidden layer instead, at the spec's λ. The spec must have a hidden
// layer.
func SweepUnits(ctx context.Context, s *spec.Network, set *data.Set, units []int, cfg SweepConfig) (*Sweep, error) {
	if s == nil {
		return nil, fmt.Errorf("%w: nil spec", ErrConfig)
	}
	if len(s.Hidden) == 0 {
		return nil, fmt.Errorf("%w: the spec has no hidden layer whose units could vary", ErrConfig)
	}
	if len(units) == 0 {
		return nil, fmt.Errorf("%w: no unit counts to sweep", ErrConfig)
	}
	specs := make([]*spec.Network, len(units))
	for i, u := range units {
		if u < 1 {
			return nil, fmt.Errorf("%w: unit count %d is %d, want ≥ 1", ErrConfig, i+1, u)
		}
		specs[i] = s.Clone()
		specs[i].Hidden[0].Units = u
	}
	return sweep(ctx, HiddenUnits, specs, set, cfg)
}

func sweep(ctx context.Context, param SweepParam, specs []*spec.Network, set *data.Set, cfg SweepConfig) (*Sweep, error) {
	if set == nil {
		return nil, fmt.Errorf("%w: nil data set", ErrConfig)
	}
	switch {
	case cfg.Folds != 0 && cfg.Holdout != 0:
		return nil, fmt.Errorf("%w: both Folds (%d) and Holdout (%g) are set; choose one", ErrConfig, cfg.Folds, cfg.Holdout)
	case cfg.Folds < 0 || cfg.Folds == 1:
		return nil, fmt.Errorf("%w: Folds = %d, want ≥ 2 (or 0 for %d)", ErrConfig, cfg.Folds, DefaultFolds)
	case cfg.Holdout != 0 && !(cfg.Holdout > 0 && cfg.Holdout < 1):
		return nil, fmt.Errorf("%w: Holdout = %g, want a fraction in (0, 1)", ErrConfig, cfg.Holdout)
	}
	for _, sp := range specs {
		if err := train.CheckSpec(sp); err != nil {
			return nil, err
		}
		if err := checkSet(sp, set); err != nil {
			return nil, err
		}
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
	sw := &Sweep{Param: param, Folds: len(parts), Holdout: cfg.Holdout}
	fc := fitConfig{method: cfg.Method, limits: cfg.Limits, noScale: cfg.NoScale, workers: cfg.Workers, seed: seed}
	for i, sp := range specs {
		var tc, vc, ta, va []float64
		for _, pt := range parts {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("diag: sweep: %w", err)
			}
			f, err := fit(ctx, sp, set.Subset(pt[0]), set.Subset(pt[1]), fc)
			if err != nil {
				return nil, fmt.Errorf("diag: sweep at %s = %s: %w", param, valueOf(param, sp), err)
			}
			sw.Warnings = appendNew(sw.Warnings, f.warn...)
			tc, vc = append(tc, f.trainCost), append(vc, f.validCost)
			ta, va = append(ta, f.trainAcc), append(va, f.validAcc)
		}
		p := SweepPoint{
			Lambda: sp.Penalty.L2, TrainCost: statOf(tc), ValidCost: statOf(vc),
			TrainAccuracy: statOf(ta), ValidAccuracy: statOf(va),
		}
		if len(sp.Hidden) > 0 {
			p.Units = sp.Hidden[0].Units
		}
		sw.Points = append(sw.Points, p)
		if sw.Points[i].ValidCost.Mean < sw.Points[sw.Best].ValidCost.Mean {
			sw.Best = i
		}
	}
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
	res, err := train.Train(ctx, s, tr, train.Config{
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
			return fitted{}, fmt.Errorf("%w: %w", ErrConfig, err)
		}
		scr, err := train.NewScorer(net, x, part.set, fc.workers)
		if err != nil {
			return fitted{}, err
		}
		*part.cost, *part.acc = scr.Measure(m.Params)
	}
	return out, nil
}
