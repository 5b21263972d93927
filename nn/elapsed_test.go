package nn

import (
	"bytes"
	"math"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/spec"
)

// The summary's elapsed time is a time.Duration in Go and seconds in the
// model file; it comes back to the nanosecond, and seconds that are no
// duration read as 0.
func TestSummaryElapsed(t *testing.T) {
	s := &spec.Network{Version: 1, Inputs: 1, Output: spec.Output{Classes: []string{"a", "b"}, Activation: spec.Softmax},
		Init: spec.Init{Scheme: spec.GlorotUniform, Seed: 1}}
	net, err := Compile(s)
	require.NoError(t, err)
	for _, d := range []time.Duration{0, 1, 1234567891, 3*time.Hour + 7*time.Nanosecond, 100 * 24 * time.Hour} {
		m, err := NewModel(s, net.NewParams(), nil, nil)
		require.NoError(t, err)
		m.SetSummary(Summary{Elapsed: d})
		var buf bytes.Buffer
		_, err = m.WriteTo(&buf)
		require.NoError(t, err)
		assert.Contains(t, buf.String(), `"seconds": `)
		back, err := ReadModel(&buf)
		require.NoError(t, err)
		assert.Equal(t, d, back.Summary().Elapsed)
	}
	for _, sec := range []float64{-1, math.NaN(), 1e300} {
		assert.Zero(t, fileDuration(sec), "%g", sec)
	}
	assert.Equal(t, 1500*time.Millisecond, fileDuration(1.5))
}
