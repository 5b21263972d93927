package main

import (
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestCompareCheckOrder: compare checks its flags before it reads a spec,
// in a fixed order (the problems, then the optimizers and limits, then the
// outputs), so that with several faults the first is reported, word for
// word, with status 2.
func TestCompareCheckOrder(t *testing.T) {
	dir := t.TempDir()
	missing := filepath.Join(dir, "none.yaml")
	noFolder := filepath.Join(dir, "no", "trace.csv")
	// ok names a problem whose files do not exist: every case fails before
	// reading them.
	ok := func(more ...string) []string { return append([]string{"-spec", missing, "-data", binaryData}, more...) }
	for _, tt := range []struct {
		name string
		args []string
		want string
	}{
		{"-problems and -spec before the optimizers", []string{"-problems", "p.txt", "-spec", "a", "-optimizers", "x"},
			"give either -problems or -spec and -data, not both"},
		{"-data before the optimizers", []string{"-spec", "a", "-optimizers", "x"}, "-data is required"},
		{"the optimizers before -seeds", ok("-optimizers", "gd,x", "-seeds", "0"),
			`-optimizers: item 2 is "x"; want names among gd, cg, lbfgs, momentum, adam`},
		{"-iterations before -evaluations", ok("-iterations", "-1", "-evaluations", "-1"), "-iterations -1: want ≥ 0"},
		{"-evaluations", ok("-evaluations", "NaN"), "-evaluations NaN: want a number ≥ 0"},
		{"-holdout before -batch", ok("-holdout", "1", "-batch", "-1"), "-holdout 1: want a fraction in [0, 1)"},
		{"-batch before -target", ok("-batch", "-1", "-target", "0"), "-batch -1: want ≥ 0"},
		{"-target", ok("-target", "+Inf"), "-target +Inf: want a fraction > 0"},
		{"-target before -plot", ok("-target", "0", "-plot", "x.jpg"), "-target 0: want a fraction > 0"},
		{"-plot before -shard", ok("-plot", "x.jpg", "-shard", "2"), "-plot x.jpg: want a file name ending in .png or .svg"},
		{"-shard before -trace", ok("-shard", "2", "-trace", binaryData), `-shard "2": want K/N (e.g. 0/4), env or env/N`},
		{"-trace with -shard", ok("-shard", "0/2", "-trace", "t.csv"),
			"-trace: a shard writes only its part; write the trace with seine merge -trace"},
		{"-out without -shard", ok("-out", "p.json"), "-out p.json: -out writes a shard's part; give -shard K/N too"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(append([]string{"compare"}, tt.args...)...)
			require.Equal(t, 2, r.code, r.stderr)
			assert.Equal(t, "seine compare: "+tt.want+" (see 'seine help compare')\n", r.stderr)
			assert.Empty(t, r.stdout)
		})
	}

	// -trace is checked (status 1: its folder does not exist) before the
	// spec is read.
	r := runIn(append([]string{"compare", "-trace", noFolder}, ok()...)...)
	require.Equal(t, 1, r.code, r.stderr)
	oneLineError(t, r.stderr, "-trace", noFolder)
	assert.NotContains(t, r.stderr, missing)
}
