package nn

import (
	"runtime"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

const memorySpec = `
version: 1
inputs: 16
hidden:
  - units: 24
    activation: tanh
output:
  classes: [a, b, c, d, e]
`

func memoryNet(t *testing.T) *Net {
	t.Helper()
	s, err := spec.Parse(strings.NewReader(memorySpec))
	require.NoError(t, err)
	n, err := Compile(s)
	require.NoError(t, err)
	return n
}

// TestTrainingBytesFormula checks the documented formula on a case worked
// by hand: P = 16·24+24+24·5+5 = 533, m = 10,000, W = 2, c = 256,
// Σ_{l≥1} n_l = 29, 40 chunks:
//
//	data 10,000·(16+5) = 210,000 words; workspaces 2·(2·533 + 3·256·29)
//	= 46,676; gradient 533; in all 257,209 words = 2,057,672 bytes, plus
//	40·160 = 6,400 bytes; plus the packing scratch 2·S, where S is the
//	largest of the products' (internal/gemm.BufLen): ∂W_1 (24×16 over 256
//	rows) needs 4·12 + 256·24 + 256·24 = 12,336 words (0 with OpenBLAS).
func TestTrainingBytesFormula(t *testing.T) {
	n := memoryNet(t)
	S := packLen(n, 256, true)
	if productBufLen(24, 16, 256) > 0 {
		assert.Equal(t, 12_336, S, "packing scratch words")
	}
	base := int64(2_064_072 + 8*2*S)
	assert.Equal(t, base, n.TrainingBytes(10_000, ObjectiveOptions{Workers: 2}), "TrainingBytes")
	// A mini-batch of 100 rows adds the permutation (10,000 words) and the
	// gathered batch, 100·16 + 100·5 words.
	assert.Equal(t, base+8*(10_000+1_600+500), n.TrainingBytes(10_000, ObjectiveOptions{Workers: 2, Batch: 100}), "with Batch 100")
}

// TestTrainingBytesMeasured compares the estimate without the data matrices
// with the bytes that NewObjective and the first Eval allocate. The bound is
// loose (±25%) because the estimate leaves out slice headers, goroutine
// stacks and the runtime's size classes, while the arrays it counts make up
// nearly all of the bytes.
func TestTrainingBytesMeasured(t *testing.T) {
	n := memoryNet(t)
	const m = 2000
	x := mat.NewDense(m, 16, nil)
	y := mat.NewDense(m, 5, nil)
	for i := 0; i < m; i++ {
		y.Set(i, i%5, 1)
		for j := 0; j < 16; j++ {
			x.Set(i, j, float64((i*j)%7)-3)
		}
	}
	params := n.NewParams()
	grad := make([]float64, len(params))
	opt := ObjectiveOptions{Workers: 2}
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	o, err := NewObjective(n, x, y, opt)
	require.NoError(t, err)
	o.Eval(grad, params)
	runtime.ReadMemStats(&after)
	measured := float64(after.TotalAlloc - before.TotalAlloc)
	est := float64(n.TrainingBytes(m, opt) - 8*m*(16+5))
	t.Logf("allocated %.0f bytes, estimate %.0f", measured, est)
	r := measured / est
	assert.GreaterOrEqual(t, r, 0.75, "allocated %.0f bytes, estimate %.0f (ratio %.3f)", measured, est, r)
	assert.LessOrEqual(t, r, 1.25, "allocated %.0f bytes, estimate %.0f (ratio %.3f)", measured, est, r)
	runtime.KeepAlive(o)
}
