package spec

import (
	"bytes"
	"fmt"
	"runtime"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gopkg.in/yaml.v3"
)

// aliasSpec returns a valid spec of inputs category inputs that all share
// one anchored list of levels: each alias stands for a copy of the list.
func aliasSpec(inputs, levels int) string {
	var b strings.Builder
	b.WriteString("version: 1\ninputs:\n  - {name: i0, type: category, levels: &lv [")
	for j := range levels {
		if j > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "level%05d", j)
	}
	b.WriteString("]}\n")
	for i := 1; i < inputs; i++ {
		fmt.Fprintf(&b, "  - {name: i%d, type: category, levels: *lv}\n", i)
	}
	b.WriteString("output: {classes: [a, b]}\n")
	return b.String()
}

// TestAliasBomb checks that aliases are counted against MaxBytes as the
// parser sees them (issue 13, item 1): 2000 inputs sharing 2000 levels
// are a 114 kB file that stands for 2000·2000 levels, about 44 MB as
// written back, which no reader with the 1 MiB limit would load.
func TestAliasBomb(t *testing.T) {
	src := aliasSpec(2000, 2000)
	require.Less(t, len(src), 1<<20/4)

	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	_, err := Parse(strings.NewReader(src))
	runtime.ReadMemStats(&after)

	require.ErrorIs(t, err, ErrTooLarge)
	e, ok := err.(*Error)
	require.True(t, ok, "want one *Error, got %T: %v", err, err)
	// The list is 1 + 2000·(10+1) = 22001 bytes as counted, an alias
	// "*lv" 3 + 1: each adds 21997 to the file's length. The k-th alias
	// (line k+3) is the first to pass the limit.
	k := (1<<20-len(src))/21997 + 1
	assert.Equal(t, k+3, e.Line, "%v", err)
	assert.Equal(t, 41, e.Column) // at "*lv" after "name: iNN, "
	assert.Contains(t, err.Error(), "aliases expand the spec to more than the limit of 1048576 bytes")

	// Bound on memory: the decoder's nodes for a 114 kB document (about
	// 14 000 nodes of a few hundred bytes) and nothing built from the
	// expansion, whose level slices alone would take 2000·2000·16 B = 64 MB.
	assert.Less(t, after.TotalAlloc-before.TotalAlloc, uint64(16<<20))

	// The same limit applies through Limits, and a spec whose expansion
	// fits is read, and written back within the limit.
	small := aliasSpec(40, 2000) // 40·22001 ≈ 880 kB expanded
	n, err := Parse(strings.NewReader(small))
	require.NoError(t, err)
	assert.Equal(t, 80000, n.Width())
	var buf bytes.Buffer
	require.NoError(t, n.WriteYAML(&buf))
	assert.LessOrEqual(t, buf.Len(), DefaultMaxBytes)
	_, err = ParseLimits(strings.NewReader(small), Limits{MaxBytes: 800_000})
	require.ErrorIs(t, err, ErrTooLarge)
}

// TestAliasExpansionLinear checks that nested aliases are measured once
// each: ten nested lists of ten stand for 2·10^10 bytes and must be
// measured without being walked.
func TestAliasExpansionLinear(t *testing.T) {
	var b strings.Builder
	b.WriteString("version: 1\nx:\n  - &l0 [a, a, a, a, a, a, a, a, a, a]\n")
	for k := 1; k < 10; k++ {
		fmt.Fprintf(&b, "  - &l%d [%s]\n", k, strings.TrimSuffix(strings.Repeat(fmt.Sprintf("*l%d, ", k-1), 10), ", "))
	}
	src := b.String()

	// The size of l_k: l_0 = 1 + 10·(1+1) = 21, l_k = 1 + 10·l_{k−1},
	// so l_9 = 21 111 111 111.
	root, e := decode([]byte(src))
	require.Nil(t, e)
	l9 := root.Content[3].Content[9]
	require.Equal(t, "l9", l9.Anchor)
	x := &expansion{limit: 1 << 40, memo: make(map[*yaml.Node]int64), busy: make(map[*yaml.Node]bool)}
	assert.Equal(t, int64(21_111_111_111), x.size(l9))
	// Measured once each: the 10 lists and the 10 scalars of l_0.
	assert.Len(t, x.memo, 10+10)

	// Within a limit of 1 TiB, the spec fails on its unknown key, after
	// the count has gone through 10^10 expanded scalars in no time.
	_, err := ParseLimits(strings.NewReader(src), Limits{MaxBytes: 1 << 40})
	require.ErrorIs(t, err, ErrUnknownField)
	require.NotErrorIs(t, err, ErrTooLarge)
	_, err = Parse(strings.NewReader(src))
	require.ErrorIs(t, err, ErrTooLarge)
}
