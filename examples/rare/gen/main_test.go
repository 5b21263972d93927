package main

import (
	"bytes"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestCommitted: the committed signins.csv is what the generator writes
// with its default row count and seed, so the data and the code that made
// it cannot drift apart.
func TestCommitted(t *testing.T) {
	var b bytes.Buffer
	require.NoError(t, write(&b, 6000, 20261203))
	want, err := os.ReadFile("../signins.csv")
	require.NoError(t, err)
	// Not assert.Equal: a diff of two 6000-line files is no help.
	assert.True(t, bytes.Equal(b.Bytes(), want), "examples/rare/signins.csv differs from `go run ./examples/rare/gen`; regenerate it")
}

// TestShares: the file has the rare class at about takeoverShare and the
// gaps the README promises. With 6000 rows the binomial SD of the takeover
// count is √(6000·0.03·0.97) ≈ 13; the bounds are over 3 SD wide.
func TestShares(t *testing.T) {
	var b bytes.Buffer
	require.NoError(t, write(&b, 6000, 20261203))
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")[1:]
	takeovers, noChannel, noTyping := 0, 0, 0
	for _, l := range lines {
		f := strings.Split(l, ",")
		require.Len(t, f, len(header), "fields of line %q", l)
		if f[7] == "takeover" {
			takeovers++
		}
		if f[6] == "" {
			noChannel++
		}
		if f[5] == "" {
			noTyping++
			assert.Contains(t, []string{"api", ""}, f[6], "typing_ms missing on a %s sign-in", f[6])
		}
	}
	assert.InDelta(t, 180, takeovers, 40, "takeovers in 6000 rows, want about 180")
	assert.InDelta(t, 240, noChannel, 60, "rows without a channel, want about 240")
	assert.NotZero(t, noTyping, "no API sign-in without typing_ms")
}
