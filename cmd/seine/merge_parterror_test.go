package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestMergeNamesPartFile: when diag refuses to merge parts that seine's own
// checks let through (here parts edited by hand after the run), the error
// names the part files (diag.PartError), not "part i".
func TestMergeNamesPartFile(t *testing.T) {
	dir := t.TempDir()
	// shards runs args as shards 0/2 and 1/2 in-process and returns their
	// part files, in the order of K.
	shards := func(name string, args ...string) []string {
		t.Helper()
		var paths []string
		for k := range 2 {
			p := filepath.Join(dir, fmt.Sprintf("%s-%d.json", name, k))
			r := runIn(append(args, "-shard", fmt.Sprintf("%d/2", k), "-out", p, "-quiet")...)
			require.Equal(t, 0, r.code, r.stderr)
			paths = append(paths, p)
		}
		return paths
	}
	// edit rewrites the part file at path with change applied.
	edit := func(path string, change func(*part)) {
		t.Helper()
		b, err := os.ReadFile(path)
		require.NoError(t, err)
		var p part
		require.NoError(t, json.Unmarshal(b, &p))
		change(&p)
		b, err = json.Marshal(&p)
		require.NoError(t, err)
		require.NoError(t, os.WriteFile(path, b, 0o644))
	}
	sweep := shards("sweep", "sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0,1", "-folds", "2", "-iterations", "2")
	edit(sweep[1], func(p *part) { p.Sweep.Fits = p.Sweep.Fits[:1] })
	curve := shards("curve", "curve", "-spec", binarySpec, "-data", binaryData, "-steps", "2", "-iterations", "2")
	edit(curve[0], func(p *part) { p.Curve.Baseline = 0.25 })
	edit(curve[1], func(p *part) { p.Curve.Baseline = 0.5 })
	compare := shards("compare", "compare", "-spec", binarySpec, "-data", binaryData, "-optimizers", "gd,cg", "-iterations", "2")
	edit(compare[1], func(p *part) { p.Compare[0].Target = 0.5 })

	for _, tt := range []struct {
		name  string
		parts []string
		want  string
	}{
		{"sweep", sweep, fmt.Sprintf("seine merge: diag: bad configuration: %s (shard 1/2) holds 1 fits, want 2\n", sweep[1])},
		{"curve, given in reverse", []string{curve[1], curve[0]},
			fmt.Sprintf("seine merge: diag: bad configuration: %s is a curve of 2 steps, 15 holdout rows, baseline 0.25; %s of 2, 15, 0.5\n",
				curve[0], curve[1])},
		{"compare", compare,
			fmt.Sprintf("seine merge: problem 1 (binary on binary.csv): diag: bad configuration: %s is another comparison than %s "+
				"(methods, seeds, target, rows, batch or warnings differ)\n", compare[1], compare[0])},
	} {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(append([]string{"merge"}, tt.parts...)...)
			require.Equal(t, 1, r.code, r.stderr)
			require.Equal(t, tt.want, r.stderr)
			require.Empty(t, r.stdout)
		})
	}
}
