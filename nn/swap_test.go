package nn

import (
	"bytes"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/spec"
)

// swapRows are the query rows of the hot-swap test.
var swapRows = [][]float64{{0, 0, 0}, {1, -2, 0.5}, {3.5, 10, -7}, {-0.25, 2, 9}, {5, 5, 5}}

// TestHotSwap: 64 goroutines query through an atomic.Pointer[Model] while
// another goroutine reads fresh model files and swaps them in. Each query
// loads the pointer once, and its answer must equal bit for bit the answer
// computed sequentially, beforehand, with the model it used. Run under
// -race this also checks that a swap publishes a fully built model.
func TestHotSwap(t *testing.T) {
	const (
		readers = 64
		swaps   = 16
		queries = 150
	)
	// Model files of the same net with different params, as a nightly
	// retraining would write them.
	base := testModel(t, spec.Softmax, []string{"x", "y", "z"}, false)
	files := make([][]byte, swaps+1)
	for v := range files {
		p := mustCompile(t, base.spec).NewParams()
		mustCompile(t, base.spec).Init(p, uint64(100+v))
		for i := range p {
			p[i] *= 3
		}
		m, err := NewModel(base.spec, p, base.Encoder(), nil)
		require.NoError(t, err)
		var b bytes.Buffer
		_, err = m.WriteTo(&b)
		require.NoError(t, err)
		files[v] = b.Bytes()
	}

	// answers maps each model that was ever published to its sequential
	// answers; an entry is stored before the model is, so a reader that
	// sees the model also sees its entry.
	var answers sync.Map // *Model → [][]float64
	load := func(b []byte) *Model {
		m, err := ReadModel(bytes.NewReader(b))
		if err != nil {
			panic(err) // the files were just written; reported via recover below
		}
		want := make([][]float64, len(swapRows))
		for i, r := range swapRows {
			want[i] = m.Probabilities(nil, r)
		}
		answers.Store(m, want)
		return m
	}
	var current atomic.Pointer[Model]
	current.Store(load(files[0]))

	var (
		wg       sync.WaitGroup
		bad      atomic.Int64
		seen     sync.Map // *Model → true, models that answered a query
		stop     atomic.Bool
		answered atomic.Int64 // queries answered so far
		firstBad atomic.Value
	)
	for g := range readers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			dst := make([]float64, 3)
			for n := 0; ; n++ {
				// stop is read before the query, so a reader's last query
				// comes after the last swap: the last model always answers.
				stopped := stop.Load()
				m := current.Load() // once per query
				i := (g + n) % len(swapRows)
				m.Probabilities(dst, swapRows[i])
				w, _ := answers.Load(m)
				want := w.([][]float64)[i]
				for k := range dst {
					if math.Float64bits(dst[k]) != math.Float64bits(want[k]) {
						bad.Add(1)
						firstBad.CompareAndSwap(nil, dst[k]-want[k])
					}
				}
				seen.Store(m, true)
				answered.Add(1)
				if n >= queries && stopped {
					return
				}
				if n > 100*queries {
					return // the swapper is stuck; the checks below report it
				}
			}
		}()
	}
	var swapErr atomic.Value
	wg.Add(1)
	go func() {
		defer wg.Done()
		defer stop.Store(true)
		defer func() {
			if r := recover(); r != nil {
				swapErr.Store(r)
			}
		}()
		// Swap only once the readers are querying, so that the first
		// model answers too (on 2 cores the swapper could otherwise run
		// through every swap before any reader starts).
		for answered.Load() < readers {
			runtime.Gosched()
		}
		for v := 1; v <= swaps; v++ {
			current.Store(load(files[v]))
		}
	}()
	wg.Wait()
	require.Nil(t, swapErr.Load(), "loading a fresh model")
	require.Zero(t, bad.Load(), "answers differing from the sequential ones (first difference %v)", firstBad.Load())
	n := 0
	seen.Range(func(_, _ any) bool { n++; return true })
	// At least the first and the last model answered (readers run past the
	// last swap); usually many more did.
	require.GreaterOrEqual(t, n, 2, "models that answered queries")
	t.Logf("%d of %d models answered queries", n, swaps+1)
}
