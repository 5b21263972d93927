package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/internal/fit"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// gradTolerance is the largest relative error that passes. optim's
// CheckGradient documents that a correct gradient of a smooth function of
// moderate scale gives about 1e-7 or less with central differences
// (truncation O(h²) ≈ 1e-10 plus rounding O(ε/h) ≈ 1e-10), and a wrong
// component 1e-2 or more.
const gradTolerance = 1e-6

const gradientCheckHelp = `Compares the gradient that backpropagation gives with central finite
differences of the cost, coordinate by coordinate, at the spec's initial
params (init seed), penalty included. The rows are the first -rows rows of
-data, standardized on themselves, or without -data random rows (standard
normal features) with random classes drawn from -seed.

The error of coordinate i is |g_i − ĝ_i| / max(1, |g_i|, |ĝ_i|), g the
analytic and ĝ the numeric gradient. The report names the worst param by
layer (1 = the layer after the inputs) and position: "weight [j,k]" is the
weight into unit j from unit k of the layer below, "bias [j]" the bias of
unit j, both counted from 0. The check fails (exit status 1) when the
largest error exceeds 1e-6. It costs 1 + 2·P cost evaluations for P params.
`

// gradReport is the outcome of gradient-check; its JSON form is -json's.
type gradReport struct {
	MaxRelErr float64 `json:"max_relative_error"`
	Param     int     `json:"param"` // index in params
	Layer     int     `json:"layer"` // 1-based weight layer
	Name      string  `json:"name"`  // e.g. "layer 2 weight [3,7]"
	Analytic  float64 `json:"analytic"`
	Numeric   float64 `json:"numeric"`
	Params    int     `json:"params"`
	Rows      int     `json:"rows"`
	Source    string  `json:"source"` // the data file, or "random"
	Tolerance float64 `json:"tolerance"`
	Passed    bool    `json:"passed"`
}

func runGradientCheck(ctx context.Context, e *env, args []string) error {
	fs := newFlags("gradient-check", e)
	comma := commaFlag(fs)
	specPath := specFlag(fs)
	dataPath := fs.String("data", "", "CSV `FILE` whose first rows to use (default random rows)")
	label := labelFlag(fs, false)
	rows := fs.Int("rows", 20, "number of `rows` to check on")
	seed := fs.Uint64("seed", 1, "seed of the random rows and classes when there is no -data")
	asJSON := jsonFlag(fs, "the result")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *specPath == "" {
		return usagef("-spec is required")
	}
	if *rows < 1 {
		return usagef("-rows %d: want at least 1", *rows)
	}
	s, err := loadSpec(ctx, *specPath)
	if err != nil {
		return err
	}
	if err := fit.CheckSpec(s); err != nil {
		return fmt.Errorf("%s: %w", *specPath, err)
	}
	var x, y *mat.Dense
	source := "random"
	if *dataPath != "" {
		set, err := loadData(ctx, *dataPath, withComma(dataFor(s, *label), comma))
		if err != nil {
			return err
		}
		sub := firstRows(set, *rows)
		prep, err := fit.Prepare(s, sub, nil, false)
		if err != nil {
			return prefixLines(*dataPath, err)
		}
		s, x, y = prep.Spec, prep.X, sub.Y
		source = *dataPath
	} else {
		// Random rows of the net's input units; category levels still to
		// be learned count as two units each.
		s = encode.Placeholder(s)
		x, y = randomRows(s, *rows, *seed)
	}
	net, err := nn.Compile(s)
	if err != nil {
		return fmt.Errorf("%s: %w", *specPath, err)
	}
	obj, err := nn.NewObjective(net, x, y, nn.ObjectiveOptions{Workers: 1})
	if err != nil {
		return fmt.Errorf("%s: %w", source, err)
	}
	params := net.NewParams()
	// Ctrl-C must still stop a long check: once ctx is done every
	// evaluation returns at once, and the check ends without a verdict.
	f := optim.Func(func(grad, x []float64) float64 {
		if ctx.Err() != nil {
			return math.NaN()
		}
		return obj.Eval(grad, x)
	})
	gc, err := optim.CheckGradient(f, params, nil)
	if ctx.Err() != nil {
		return fmt.Errorf("interrupted: no verdict")
	}
	if err != nil {
		return err
	}
	layer, name := paramName(net, gc.Index)
	r := gradReport{
		MaxRelErr: gc.MaxRelErr, Param: gc.Index, Layer: layer, Name: name,
		Analytic: gc.Analytic[gc.Index], Numeric: gc.Numeric[gc.Index],
		Params: len(params), Rows: obj.Rows(), Source: source,
		Tolerance: gradTolerance, Passed: gc.MaxRelErr <= gradTolerance,
	}
	return r.write(e.stdout, *asJSON, s)
}

// write prints r and returns an error when the check failed.
func (r *gradReport) write(w io.Writer, asJSON bool, s *spec.Network) error {
	if asJSON {
		if err := json.NewEncoder(w).Encode(r); err != nil {
			return err
		}
	} else {
		name := s.Name
		if name == "" {
			name = "spec"
		}
		fmt.Fprintf(w, "%s: %d params checked on %d rows (%s), central differences\n", name, r.Params, r.Rows, r.Source)
		fmt.Fprintf(w, "  largest relative error  %.3g, at %s (param %d)\n", r.MaxRelErr, r.Name, r.Param)
		fmt.Fprintf(w, "  there                   backpropagation %.10g, finite differences %.10g\n", r.Analytic, r.Numeric)
		verdict := "passed"
		if !r.Passed {
			verdict = "FAILED"
		}
		fmt.Fprintf(w, "  verdict                 %s (tolerance %g)\n", verdict, r.Tolerance)
	}
	if !r.Passed {
		return fmt.Errorf("gradient check failed: relative error %.3g at %s exceeds %g", r.MaxRelErr, r.Name, r.Tolerance)
	}
	return nil
}

// paramName names param i of net by its 1-based layer and its 0-based
// position in the layer's weight matrix or bias vector.
func paramName(net *nn.Net, i int) (layer int, name string) {
	sizes := net.Sizes()
	for l := 0; l < net.NumLayers(); l++ {
		w, b := net.Block(l)
		end := b + sizes[l+1]
		switch {
		case i >= w && i < b:
			k := i - w
			return l + 1, fmt.Sprintf("layer %d weight [%d,%d]", l+1, k/sizes[l], k%sizes[l])
		case i >= b && i < end:
			return l + 1, fmt.Sprintf("layer %d bias [%d]", l+1, i-b)
		}
	}
	return 0, fmt.Sprintf("param %d", i)
}

// firstRows returns the first n rows of set (all when it has fewer), with
// the features standardized on those rows.
func firstRows(set *data.Set, n int) *data.Set {
	n = min(n, set.Rows())
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	return set.Subset(idx)
}

// randomRows draws n rows of standard normal features and random targets:
// one class per row, or for a multi-label spec each class present with
// probability 1/2.
func randomRows(s *spec.Network, n int, seed uint64) (x, y *mat.Dense) {
	rng := rand.New(rand.NewPCG(seed, 0x5e1e))
	k := len(s.Output.Classes)
	w := s.Width()
	x = mat.NewDense(n, w, nil)
	y = mat.NewDense(n, k, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < w; j++ {
			x.Set(i, j, rng.NormFloat64())
		}
		if s.Output.Multilabel {
			for c := 0; c < k; c++ {
				if rng.IntN(2) == 1 {
					y.Set(i, c, 1)
				}
			}
		} else {
			y.Set(i, rng.IntN(k), 1)
		}
	}
	return x, y
}
