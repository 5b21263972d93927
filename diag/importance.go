package diag

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// DefaultRepeats is the number of shuffles of each input when
// ImportanceOptions.Repeats is 0.
const DefaultRepeats = 5

// ErrImportance is wrapped by errors in an ImportanceOptions or in how it
// fits the model and data.
var ErrImportance = errors.New("diag: cannot measure input importance")

// ImportanceOptions sets a permutation importance run. Its zero value
// shuffles each raw input DefaultRepeats times from seed 0, decides classes
// as the model does, and uses GOMAXPROCS workers.
type ImportanceOptions struct {
	// Repeats is the number of independent shuffles of each input, ≥ 1;
	// 0 means DefaultRepeats.
	Repeats int
	// Seed seeds the shuffles. Input j draws its permutations from a PCG
	// stream of its own, seeded with (Seed, j), so the result is the same
	// for any Workers and GOMAXPROCS. Every value, 0 included, is a seed.
	Seed uint64
	// Thresholds are the decision thresholds the accuracy is measured with,
	// as score.Options.Thresholds; nil means the model's own (its operating
	// thresholds for sigmoid outputs, else the most probable class).
	Thresholds []float64
	// Workers bounds the goroutines, each shuffling one input at a time
	// with a copy of the coded rows of its own; 0 means GOMAXPROCS.
	Workers int
}

// InputImportance is what shuffling one raw input costs the model.
type InputImportance struct {
	Name string
	Type spec.InputType
	// CrossEntropyRise is CE(shuffled) − CE(data), in nats per row, over
	// the repeats: how much worse the probabilities get without the
	// input's information. Near 0 (either sign) means the model does not
	// use the input on these rows.
	CrossEntropyRise Stat
	// AccuracyFall is accuracy(data) − accuracy(shuffled), a share of
	// rows, over the repeats.
	AccuracyFall Stat
	// Rises and Falls hold the figures of each repeat, in order.
	Rises, Falls []float64
}

// Importance is the permutation importance of each raw input of a model
// on a labelled data set.
type Importance struct {
	Rows    int
	Repeats int
	Seed    uint64
	// CrossEntropy and Accuracy are the model's figures on the data as
	// they are, which the shuffled figures are compared with.
	CrossEntropy, Accuracy float64
	// Inputs holds one entry per raw input, in the model's input order.
	Inputs []InputImportance
}

// Ranked returns the indices of im.Inputs from the largest mean
// cross-entropy rise to the smallest (input order on ties).
func (im *Importance) Ranked() []int {
	idx := make([]int, len(im.Inputs))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		ra, rb := im.Inputs[a].CrossEntropyRise.Mean, im.Inputs[b].CrossEntropyRise.Mean
		switch {
		case ra > rb:
			return -1
		case ra < rb:
			return 1
		}
		return 0
	})
	return idx
}

// PermutationImportance measures how much model m relies on each of its
// raw inputs on the labelled rows of set (read with the model's columns,
// e.g. data.CSVOptions{Columns: m.Encoder().Columns()}), by permutation
// importance (Breiman 2001; model reliance, Fisher, Rudin & Dominici 2019):
// for input j and repeat r, the column of input j is replaced by a random
// permutation π_r of itself, the rows are scored again, and
//
//	rise_jr = CE(X with column j permuted by π_r) − CE(X)
//	fall_jr = acc(X) − acc(X with column j permuted by π_r)
//
// where CE is the mean cross-entropy and acc the accuracy of
// score.Evaluate. Inputs are permuted in their coded form (one value per
// raw input), so a category input's units move together and a missing
// cell moves as a whole. The rise is measured on the rows given: on
// training rows it shows what the model learned to use, on held-out rows
// what helps it generalise.
//
// Inputs are spread over a bounded pool of workers; ctx is checked before
// each input and each repeat, and its error is returned wrapped.
func PermutationImportance(ctx context.Context, m *nn.Model, set *data.Set, cfg ImportanceOptions) (*Importance, error) {
	repeats := cfg.Repeats
	switch {
	case repeats == 0:
		repeats = DefaultRepeats
	case repeats < 0:
		return nil, fmt.Errorf("%w: %d repeats, want at least 1", ErrImportance, repeats)
	}
	if set == nil || set.Y == nil {
		return nil, fmt.Errorf("%w: the data set has no labels", ErrImportance)
	}
	if set.Rows() < 2 {
		return nil, fmt.Errorf("%w: %d rows, want at least 2 to shuffle", ErrImportance, set.Rows())
	}
	coded, err := m.Encoder().CodeSet(set)
	if err != nil {
		return nil, err
	}
	thresholds := cfg.Thresholds
	if thresholds == nil && m.Spec().Output.Activation == spec.Sigmoid {
		thresholds = m.Decision().Thresholds
	}
	opt := score.Options{Multilabel: m.Multilabel(), Thresholds: thresholds}
	measure := func(p *mat.Dense, x *mat.Dense) (ce, acc float64, err error) {
		m.ProbabilitiesBatch(p, x)
		r, err := score.Evaluate(p, set.Y, m.Classes(), opt)
		if err != nil {
			return 0, 0, err
		}
		return r.CrossEntropy, r.Accuracy, nil
	}
	rows, n := coded.Dims()
	var p mat.Dense
	baseCE, baseAcc, err := measure(&p, coded)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrImportance, err)
	}
	im := &Importance{Rows: rows, Repeats: repeats, Seed: cfg.Seed, CrossEntropy: baseCE, Accuracy: baseAcc,
		Inputs: make([]InputImportance, n)}
	ins := m.Encoder().Inputs()
	for j := range im.Inputs {
		im.Inputs[j] = InputImportance{Name: ins[j].Name, Type: ins[j].Type,
			Rises: make([]float64, repeats), Falls: make([]float64, repeats)}
	}

	workers := cfg.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, n)
	jobs := make(chan int)
	errs := make([]error, n) // by input, so the first error reported does not depend on scheduling
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			x := mat.DenseCopyOf(coded) // this worker's rows; one column at a time is shuffled
			var p mat.Dense
			col := make([]float64, rows)
			for j := range jobs {
				errs[j] = shuffleInput(ctx, x, coded, col, j, cfg.Seed, &im.Inputs[j], func(x *mat.Dense) (float64, float64, error) {
					ce, acc, err := measure(&p, x)
					return ce - baseCE, baseAcc - acc, err
				})
			}
		}()
	}
	for j := range n {
		if ctx.Err() != nil {
			errs[j] = ctx.Err()
			break
		}
		jobs <- j
	}
	close(jobs)
	wg.Wait()
	for j, err := range errs {
		if err != nil {
			if ctxErr := ctx.Err(); ctxErr != nil {
				return nil, fmt.Errorf("%w: %w", ErrImportance, ctxErr)
			}
			return nil, fmt.Errorf("%w: input %q: %w", ErrImportance, im.Inputs[j].Name, err)
		}
	}
	for j := range im.Inputs {
		in := &im.Inputs[j]
		in.CrossEntropyRise, in.AccuracyFall = statOf(in.Rises), statOf(in.Falls)
	}
	return im, nil
}

// shuffleInput permutes column j of x (a copy of coded) once per repeat
// with permutations drawn from the PCG stream (seed, j), records the rise
// and fall that measure returns in in, and leaves column j of x as in
// coded. col is scratch of one column.
func shuffleInput(ctx context.Context, x, coded *mat.Dense, col []float64, j int, seed uint64, in *InputImportance,
	measure func(x *mat.Dense) (rise, fall float64, err error)) error {
	rng := rand.New(rand.NewPCG(seed, uint64(j)))
	for r := range in.Rises {
		if err := ctx.Err(); err != nil {
			return err
		}
		mat.Col(col, j, coded)
		rng.Shuffle(len(col), func(a, b int) { col[a], col[b] = col[b], col[a] })
		x.SetCol(j, col)
		rise, fall, err := measure(x)
		if err != nil {
			return err
		}
		in.Rises[r], in.Falls[r] = rise, fall
	}
	mat.Col(col, j, coded)
	x.SetCol(j, col)
	return nil
}
