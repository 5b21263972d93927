package diag

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
	"github.com/seine-ml/seine/train"
)

// irisNoisy is a small net on iris's four measurements and three inputs of
// pure noise.
const irisNoisy = `version: 1
inputs: [sepal_length_cm, sepal_width_cm, petal_length_cm, petal_width_cm, noise1, noise2, noise3]
hidden:
  - units: 5
    activation: tanh
output:
  classes: [setosa, versicolor, virginica]
penalty:
  l2: 0.1
init:
  seed: 3
`

// noisyIris returns iris (Fisher 1936) with three columns of N(0, 1) noise
// drawn from a seeded PCG stream appended: inputs that carry, by
// construction, nothing about the species.
func noisyIris(t testing.TB) *data.Set {
	t.Helper()
	set := readSet(t, "iris.csv")
	r, c := set.X.Dims()
	x := mat.NewDense(r, c+3, nil)
	rng := rand.New(rand.NewPCG(2019, 1))
	for i := range r {
		for j := range c {
			x.Set(i, j, set.X.At(i, j))
		}
		for j := c; j < c+3; j++ {
			x.Set(i, j, rng.NormFloat64())
		}
	}
	set.X = x
	set.Features = append(set.Features, "noise1", "noise2", "noise3")
	return set
}

func trainNoisyIris(t testing.TB) (*nn.Model, *data.Set) {
	t.Helper()
	set := noisyIris(t)
	res, err := train.Train(context.Background(), parseSpec(t, irisNoisy), set, train.Options{Limits: optim.Limits{Iterations: 300}})
	require.NoError(t, err)
	return res.Model, set
}

// TestImportanceIrisNoise is the check: petal length and petal
// width, which separate the species (Fisher 1936, whose discriminant
// weighs the petal measurements most), each rank above every pure-noise
// input in every repeat of every seed, by cross-entropy rise. A noise
// input's rise can be above 0 (the net fits a little noise on the rows it
// was trained on) but must stay far below an informative one's.
func TestImportanceIrisNoise(t *testing.T) {
	m, set := trainNoisyIris(t)
	for seed := range uint64(4) {
		im, err := PermutationImportance(context.Background(), m, set, ImportanceOptions{Seed: seed})
		require.NoError(t, err)
		require.Len(t, im.Inputs, 7)
		assert.Equal(t, DefaultRepeats, im.Repeats)
		for _, in := range im.Inputs {
			t.Logf("seed %d %-16s rise %.4f ± %.4f [%.4f, %.4f]  fall %.4f", seed, in.Name,
				in.CrossEntropyRise.Mean, in.CrossEntropyRise.SD, in.CrossEntropyRise.Min, in.CrossEntropyRise.Max, in.AccuracyFall.Mean)
		}
		for _, informative := range []int{2, 3} { // petal length, petal width
			for noise := 4; noise < 7; noise++ {
				for r := range im.Repeats {
					assert.Greater(t, im.Inputs[informative].Rises[r], im.Inputs[noise].Rises[r],
						"seed %d repeat %d: %s should rank above %s", seed, r, im.Inputs[informative].Name, im.Inputs[noise].Name)
				}
			}
		}
		top := im.Ranked()[0]
		assert.Contains(t, []string{"petal_length_cm", "petal_width_cm"}, im.Inputs[top].Name, "seed %d", seed)
	}
}

// TestImportanceBase: the unshuffled figures are those of score.Evaluate on
// the model's probabilities of the set, and the stats summarise the
// repeats (mean, sample SD with divisor k − 1, range).
func TestImportanceBase(t *testing.T) {
	m, set := trainNoisyIris(t)
	im, err := PermutationImportance(context.Background(), m, set, ImportanceOptions{Repeats: 3, Seed: 7})
	require.NoError(t, err)
	p, err := m.ProbabilitiesSet(set)
	require.NoError(t, err)
	var want struct{ ce, acc float64 }
	{
		r, c := p.Dims()
		correct := 0
		for i := range r {
			best, truth := 0, 0
			for k := range c {
				if p.At(i, k) > p.At(i, best) {
					best = k
				}
				if set.Y.At(i, k) > set.Y.At(i, truth) {
					truth = k
				}
			}
			want.ce -= math.Log(p.At(i, truth))
			if best == truth {
				correct++
			}
		}
		want.ce /= float64(r)
		want.acc = float64(correct) / float64(r)
	}
	// Summation order differs from score's only in the final division;
	// 1e-12 relative is far below any figure printed.
	assert.InEpsilon(t, want.ce, im.CrossEntropy, 1e-12)
	assert.Equal(t, want.acc, im.Accuracy)
	assert.Equal(t, 150, im.Rows)
	in := im.Inputs[3]
	require.Len(t, in.Rises, 3)
	mean := (in.Rises[0] + in.Rises[1] + in.Rises[2]) / 3
	ss := 0.0
	for _, v := range in.Rises {
		ss += (v - mean) * (v - mean)
	}
	assert.InDelta(t, mean, in.CrossEntropyRise.Mean, 1e-15)
	assert.InDelta(t, math.Sqrt(ss/2), in.CrossEntropyRise.SD, 1e-15)
	assert.Equal(t, math.Min(in.Rises[0], math.Min(in.Rises[1], in.Rises[2])), in.CrossEntropyRise.Min)
	assert.Equal(t, math.Max(in.Rises[0], math.Max(in.Rises[1], in.Rises[2])), in.CrossEntropyRise.Max)
}

// TestImportanceUnusedInput: a model whose first-layer weights from one
// input are all zero computes the same function whatever that input is,
// so shuffling it changes no probability: its rise and fall are exactly 0
// (an identity, not a tolerance), while the others are not.
func TestImportanceUnusedInput(t *testing.T) {
	m, set := trainNoisyIris(t)
	params := append([]float64(nil), m.Params()...)
	w, _ := m.Net().Block(0)
	in := m.Net().Inputs()
	units := m.Spec().Hidden[0].Units
	const unused = 2 // petal length: informative until cut off
	for o := range units {
		params[w+o*in+unused] = 0
	}
	cut, err := nn.NewModel(m.Spec(), params, m.Encoder(), m.Classes())
	require.NoError(t, err)
	im, err := PermutationImportance(context.Background(), cut, set, ImportanceOptions{Seed: 1})
	require.NoError(t, err)
	for r := range im.Repeats {
		assert.Zero(t, im.Inputs[unused].Rises[r])
		assert.Zero(t, im.Inputs[unused].Falls[r])
	}
	assert.Greater(t, im.Inputs[3].CrossEntropyRise.Min, 0.0, "petal width still used")
}

// TestImportanceDeterministic: the same seed gives bit-identical figures
// with 1 worker under GOMAXPROCS 1 and 4 workers under GOMAXPROCS 2; a
// different seed gives different shuffles.
func TestImportanceDeterministic(t *testing.T) {
	m, set := trainNoisyIris(t)
	run := func(procs, workers int, seed uint64) *Importance {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		im, err := PermutationImportance(context.Background(), m, set, ImportanceOptions{Seed: seed, Workers: workers})
		require.NoError(t, err)
		return im
	}
	a, b := run(1, 1, 5), run(2, 4, 5)
	for j := range a.Inputs {
		for r := range a.Repeats {
			assert.Equal(t, math.Float64bits(a.Inputs[j].Rises[r]), math.Float64bits(b.Inputs[j].Rises[r]), "input %d repeat %d", j, r)
			assert.Equal(t, math.Float64bits(a.Inputs[j].Falls[r]), math.Float64bits(b.Inputs[j].Falls[r]), "input %d repeat %d", j, r)
		}
	}
	c := run(2, 0, 6)
	assert.NotEqual(t, a.Inputs[3].Rises, c.Inputs[3].Rises, "seeds 5 and 6 shuffle alike")
}

// TestImportanceCategory: a category input's units are shuffled together.
// The label is "yes" exactly when colour is red (with no noise), so the
// model leans on colour alone; shuffling it costs far more than shuffling
// an input of pure noise, and every repeat's accuracy falls by about the
// share of rows whose colour changes between red and not red (a shuffled
// red row stays red with probability 1/3 here: 2·(1/3)(2/3) = 4/9 of rows
// flip, less the few the net gets wrong anyway; we ask for a fall ≥ 0.3).
func TestImportanceCategory(t *testing.T) {
	var b strings.Builder
	b.WriteString("colour,noise,answer\n")
	rng := rand.New(rand.NewPCG(11, 0))
	colours := []string{"red", "green", "blue"}
	for i := range 300 {
		c := colours[i%3]
		if i%29 == 0 {
			c = "" // a few missing cells, which move with their rows
		}
		ans := "no"
		if c == "red" {
			ans = "yes"
		}
		fmt.Fprintf(&b, "%s,%.4f,%s\n", c, rng.NormFloat64(), ans)
	}
	s := parseSpec(t, `version: 1
inputs:
  - name: colour
    type: category
    missing: level
  - noise
output:
  classes: ["no", "yes"]
  activation: sigmoid
penalty:
  l2: 0.01
`)
	set, err := data.ReadCSV(strings.NewReader(b.String()), data.CSVOptions{Columns: encode.ColumnsFor(s), Classes: s.Output.Classes})
	require.NoError(t, err)
	res, err := train.Train(context.Background(), s, set, train.Options{Limits: optim.Limits{Iterations: 200}})
	require.NoError(t, err)
	im, err := PermutationImportance(context.Background(), res.Model, set, ImportanceOptions{Repeats: 4})
	require.NoError(t, err)
	assert.Equal(t, spec.CategoryInput, im.Inputs[0].Type)
	for r := range im.Repeats {
		assert.Greater(t, im.Inputs[0].Falls[r], 0.3, "repeat %d", r)
		assert.Greater(t, im.Inputs[0].Rises[r], 10*math.Abs(im.Inputs[1].Rises[r]), "repeat %d", r)
	}
}

// TestImportanceErrors: bad settings and a cancelled context come back as
// errors, never panics.
func TestImportanceErrors(t *testing.T) {
	m, set := trainNoisyIris(t)
	_, err := PermutationImportance(context.Background(), m, set, ImportanceOptions{Repeats: -1})
	assert.ErrorIs(t, err, ErrImportance)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = PermutationImportance(ctx, m, set, ImportanceOptions{})
	assert.ErrorIs(t, err, context.Canceled)
	assert.ErrorIs(t, err, ErrImportance)
	unlabelled := *set
	unlabelled.Y = nil
	_, err = PermutationImportance(context.Background(), m, &unlabelled, ImportanceOptions{})
	assert.ErrorIs(t, err, ErrImportance)
	_, err = PermutationImportance(context.Background(), m, set, ImportanceOptions{Thresholds: []float64{0.5}})
	assert.ErrorIs(t, err, ErrImportance, "a threshold for a softmax model")
	assert.NotErrorIs(t, err, context.Canceled, "not cancelled")
}
