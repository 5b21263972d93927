package diag

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"time"

	"github.com/seine-ml/seine/data"
	trainfit "github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// Defaults of CurveOptions.
const (
	DefaultSteps   = 10   // training sizes of a learning curve
	DefaultHoldout = 0.25 // holdout fraction of a learning curve
)

// CurveOptions sets a learning curve. Its zero value uses 10 sizes, a 25%
// stratified holdout and the spec's optimizer and limits.
type CurveOptions struct {
	// Steps is the number of training sizes, ≥ 1; 0 means DefaultSteps.
	Steps int
	// Holdout is the fraction of rows kept out, in (0, 1); 0 means
	// DefaultHoldout.
	Holdout float64
	// Seed seeds the split, the order in which rows join the training
	// subsets and the initial params; 0 means the spec's init.seed.
	Seed uint64
	// SpecPenalty trains every subset with the spec's λ and λ₁ as written.
	// Since the cost adds λ/(2m)·Σw² over the m rows of the subset, the
	// penalty per row then grows as the subset shrinks, and the curve
	// mixes the effect of fewer rows with that of a stronger penalty. The
	// default (false) scales both to λ·k/n for a subset of k of the n
	// training rows, which keeps the penalty per row at its full-data
	// value λ/(2n) so that only the data vary along the curve; the last
	// point is then trained exactly as the spec says.
	SpecPenalty bool
	// Method, Limits, NoScale and Workers are as in SweepOptions.
	Method  optim.Method
	Limits  optim.Limits
	NoScale bool
	Workers int
	// Shard, when set, runs only that part of the curve's fits (see
	// Shard); the zero value runs them all.
	Shard Shard
	// Progress, when not nil, is called after every fit.
	Progress func(FitDone)
}

// CurvePoint is the fit on one training size.
type CurvePoint struct {
	Step int // 1-based place of the size on the curve: i of steps
	Rows int // training rows used
	// TrainCost is the mean cross-entropy on those training rows and
	// HoldoutCost on the holdout, both without the penalty, in nats.
	TrainCost, HoldoutCost         float64
	TrainAccuracy, HoldoutAccuracy float64
	Warnings                       []string // the fit's own
}

// Shape is a reading of a learning curve's shape: a hint, not a verdict.
type Shape int

const (
	// NoClearSign: neither of the patterns below.
	NoClearSign Shape = iota
	// HighVariance: a large gap between holdout and training cost that
	// persists at the larger sizes; more data or a larger penalty may help.
	HighVariance
	// HighBias: both costs high and close; a larger net or a smaller
	// penalty may help.
	HighBias
)

// String describes the shape in a sentence that names what may help.
func (s Shape) String() string {
	switch s {
	case HighVariance:
		return "a large gap between holdout and training cost persists as rows are added: this suggests high variance (more data or a larger penalty may help)"
	case HighBias:
		return "training and holdout cost are both high and close: this suggests high bias (a larger net or a smaller penalty may help)"
	}
	return "no clear sign of high variance or high bias"
}

// Curve is the outcome of LearningCurve.
type Curve struct {
	Points      []CurvePoint // by growing size; the last uses every training row
	HoldoutRows int
	// Baseline is the cross-entropy on the holdout of always answering
	// the training rows' class shares (nats): the cost of knowing nothing
	// about the features, the scale against which "high" is read.
	Baseline float64
	Shape    Shape
	// Warnings are those of the fits (each text once, in the order of the
	// points).
	Warnings []string
	// Steps is the number of sizes of the whole curve.
	Steps int
	// Shard is the part of the curve this result holds; the zero value
	// means the whole curve. A part's Points are its own fits only, and
	// its Shape is NoClearSign until MergeCurves puts the parts together.
	Shard Shard
}

// LearningCurve keeps a stratified holdout of set, then trains the net of
// s on growing subsets of the remaining n rows, of sizes round(i·n/steps)
// for i = 1 … steps, and measures training and holdout cost at each
// (with the penalty per row held fixed unless cfg.SpecPenalty). The
// subsets are nested (each holds the previous one) and stratified: the
// rows of each class are shuffled and a row at rank r of its class of n_c
// rows joins at position (r + ½)/n_c of the whole order, so any prefix
// holds each class in close to its share. It checks ctx between fits.
//
// The shape is read at the two largest sizes (one if there is only one),
// with the holdout cost H, the training cost T and the baseline B:
//
//	HighVariance  when H − T > max(T, 0.1·B) at both: the holdout cost is
//	              over twice the training cost and the gap is not small;
//	HighBias      otherwise, when T > 0.5·B and H − T < 0.25·H at the
//	              largest size: training fits at most half of what there
//	              is to learn and holdout is close;
//	NoClearSign   otherwise.
//
// The thresholds are rules of thumb of this package, not published values.
//
// Fit i (0-based) trains the size of step i + 1; cfg.Shard selects a part
// of them. Every shard computes the split, the order and the baseline.
func LearningCurve(ctx context.Context, s *spec.Network, set *data.Set, cfg CurveOptions) (*Curve, error) {
	if s == nil || set == nil {
		return nil, fmt.Errorf("%w: nil spec or data set", ErrOptions)
	}
	switch {
	case cfg.Steps < 0:
		return nil, fmt.Errorf("%w: Steps = %d, want ≥ 1 (or 0 for %d)", ErrOptions, cfg.Steps, DefaultSteps)
	case cfg.Holdout != 0 && !(cfg.Holdout > 0 && cfg.Holdout < 1):
		return nil, fmt.Errorf("%w: Holdout = %g, want a fraction in (0, 1)", ErrOptions, cfg.Holdout)
	}
	steps, hold := cfg.Steps, cfg.Holdout
	if steps == 0 {
		steps = DefaultSteps
	}
	if hold == 0 {
		hold = DefaultHoldout
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
	seed := cfg.Seed
	if seed == 0 {
		seed = s.Init.Seed
	}
	trainSet, holdSet, err := data.Split(set, hold, seed)
	if err != nil {
		return nil, fmt.Errorf("diag: curve: holdout split: %w", err)
	}
	n := trainSet.Rows()
	if steps > n {
		return nil, fmt.Errorf("%w: %d steps for %d training rows; want at most one step per row", ErrOptions, steps, n)
	}
	order := stratifiedOrder(trainSet, seed)
	c := &Curve{HoldoutRows: holdSet.Rows(), Baseline: baseline(trainSet, holdSet), Steps: steps, Shard: cfg.Shard}
	fc := fitConfig{method: cfg.Method, limits: cfg.Limits, noScale: cfg.NoScale, workers: cfg.Workers, seed: seed}
	total, start := cfg.Shard.Count(steps), time.Now()
	for i := 1; i <= steps; i++ {
		if !cfg.Shard.has(i - 1) {
			continue
		}
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("diag: curve: %w", err)
		}
		k := int(math.Round(float64(i) * float64(n) / float64(steps)))
		sub := trainSet.Subset(order[:k])
		sk := s
		if !cfg.SpecPenalty {
			sk = s.Clone()
			sk.Penalty.L2 = s.Penalty.L2 * float64(k) / float64(n)
			sk.Penalty.L1 = s.Penalty.L1 * float64(k) / float64(n)
		}
		f, err := fit(ctx, sk, sub, holdSet, fc)
		if err != nil {
			return nil, fmt.Errorf("diag: curve at %d rows: %w", k, err)
		}
		c.Warnings = appendNew(c.Warnings, f.warn...)
		c.Points = append(c.Points, CurvePoint{
			Step: i, Rows: k, TrainCost: f.trainCost, HoldoutCost: f.validCost,
			TrainAccuracy: f.trainAcc, HoldoutAccuracy: f.validAcc, Warnings: f.warn,
		})
		if cfg.Progress != nil {
			units := 0
			if len(sk.Hidden) > 0 {
				units = sk.Hidden[0].Units
			}
			cfg.Progress(FitDone{
				Index: i - 1, Done: len(c.Points), Total: total, Lambda: sk.Penalty.L2, Units: units,
				Rows: k, Elapsed: time.Since(start),
			})
		}
	}
	if cfg.Shard.Whole() {
		c.Shape = shapeOf(c.Points, c.Baseline)
	}
	return c, nil
}

// MergeCurves puts the parts of a sharded learning curve back together:
// parts must hold each shard 0 … N−1 of one N exactly once, all of the
// same curve (steps, holdout rows and baseline; that they come from the
// same spec, data and settings is for the caller to check). The result
// equals the whole curve's, bit for bit. Errors wrap ErrOptions; one that
// blames a part is a *PartError, which names it by its index in parts.
func MergeCurves(parts []*Curve) (*Curve, error) {
	if err := checkShards(parts, func(p *Curve) Shard { return p.Shard }); err != nil {
		return nil, err
	}
	p0 := parts[0]
	if p0.Steps < 1 {
		return nil, partErrorf(0, "%s: %d steps, want ≥ 1", partRef(0), p0.Steps)
	}
	c := &Curve{HoldoutRows: p0.HoldoutRows, Baseline: p0.Baseline, Steps: p0.Steps, Points: make([]CurvePoint, p0.Steps)}
	have := make([]bool, c.Steps)
	for i, p := range parts {
		if p.Steps != c.Steps || p.HoldoutRows != c.HoldoutRows || math.Float64bits(p.Baseline) != math.Float64bits(c.Baseline) {
			return nil, partErrorf(i, "%s is a curve of %d steps, %d holdout rows, baseline %g; %s of %d, %d, %g",
				partRef(i), p.Steps, p.HoldoutRows, p.Baseline, partRef(0), c.Steps, c.HoldoutRows, c.Baseline)
		}
		if len(p.Points) != p.Shard.Count(p.Steps) {
			return nil, partErrorf(i, "%s (shard %s) holds %d points, want %d", partRef(i), p.Shard, len(p.Points), p.Shard.Count(p.Steps))
		}
		for _, pt := range p.Points {
			j := pt.Step - 1
			if j < 0 || j >= c.Steps || !p.Shard.has(j) || have[j] {
				return nil, partErrorf(i, "%s (shard %s): step %d does not belong there or is given twice", partRef(i), p.Shard, pt.Step)
			}
			have[j] = true
			c.Points[j] = pt
		}
	}
	for _, pt := range c.Points {
		c.Warnings = appendNew(c.Warnings, pt.Warnings...)
	}
	c.Shape = shapeOf(c.Points, c.Baseline)
	return c, nil
}

// shapeOf reads the shape as LearningCurve documents.
func shapeOf(pts []CurvePoint, base float64) Shape {
	last := pts[len(pts)-1]
	prev := last
	if len(pts) > 1 {
		prev = pts[len(pts)-2]
	}
	wide := func(p CurvePoint) bool {
		return p.HoldoutCost-p.TrainCost > math.Max(p.TrainCost, 0.1*base)
	}
	switch {
	case wide(last) && wide(prev):
		return HighVariance
	case last.TrainCost > 0.5*base && last.HoldoutCost-last.TrainCost < 0.25*last.HoldoutCost:
		return HighBias
	}
	return NoClearSign
}

// stratifiedOrder returns the row indices of s in an order whose every
// prefix holds each class in close to its share: rows of each class are
// shuffled, and the row at rank r of a class of n_c rows gets the key
// (r + ½)/n_c; rows are sorted by key, ties by class.
func stratifiedOrder(s *data.Set, seed uint64) []int {
	labels := s.Labels()
	byClass := map[int][]int{}
	var classes []int
	for i, l := range labels {
		if _, ok := byClass[l]; !ok {
			classes = append(classes, l)
		}
		byClass[l] = append(byClass[l], i)
	}
	sort.Ints(classes)
	rng := rand.New(rand.NewPCG(seed, 0x6c6561726e)) // second word: "learn"
	type keyed struct {
		key   float64
		class int
		row   int
	}
	var all []keyed
	for _, c := range classes {
		rows := byClass[c]
		rng.Shuffle(len(rows), func(a, b int) { rows[a], rows[b] = rows[b], rows[a] })
		for r, row := range rows {
			all = append(all, keyed{(float64(r) + 0.5) / float64(len(rows)), c, row})
		}
	}
	sort.SliceStable(all, func(a, b int) bool {
		if all[a].key != all[b].key {
			return all[a].key < all[b].key
		}
		return all[a].class < all[b].class
	})
	order := make([]int, len(all))
	for i, k := range all {
		order[i] = k.row
	}
	return order
}

// baseline returns the mean cross-entropy on hold of the prediction that
// gives every row the class shares of tr (single-label), or each class its
// share of rows (multi-label, per-class binary cross-entropy summed over
// classes). Shares are floored at 1/(2n) so that a class absent from tr
// gives a large finite cost.
func baseline(tr, hold *data.Set) float64 {
	n := float64(tr.Rows())
	counts := tr.Counts()
	share := make([]float64, len(counts))
	for k, c := range counts {
		share[k] = math.Max(float64(c)/n, 1/(2*n))
		if tr.Multilabel {
			share[k] = math.Min(share[k], 1-1/(2*n))
		}
	}
	m, K := hold.Y.Dims()
	var sum float64
	for i := range m {
		for k := range K {
			y := hold.Y.At(i, k)
			if tr.Multilabel {
				sum -= y*math.Log(share[k]) + (1-y)*math.Log(1-share[k])
			} else if y > 0 {
				sum -= y * math.Log(share[k])
			}
		}
	}
	return sum / float64(m)
}
