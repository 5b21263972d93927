package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/diag"
)

// The small fixtures keep every fit to milliseconds: 60 rows, 3 inputs.
var (
	binarySpec = filepath.Join("testdata", "binary.yaml")
	binaryData = filepath.Join("testdata", "binary.csv")
	tagsSpec   = filepath.Join("testdata", "tags.yaml")
	tagsData   = filepath.Join("testdata", "tags.csv")
)

// seineEnv runs the built tool with args and extra environment variables.
func seineEnv(t *testing.T, environ []string, args ...string) result {
	t.Helper()
	cmd := exec.Command(bin, args...)
	cmd.Env = append(os.Environ(), environ...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err := cmd.Run()
	code := 0
	if ee, ok := err.(*exec.ExitError); ok {
		code = ee.ExitCode()
	} else if err != nil {
		require.NoError(t, err, "running seine")
	}
	return result{code: code, stdout: out.String(), stderr: errb.String()}
}

// runShards runs command args as N shards, each its own process, and
// returns the part files, in reverse order of K (so that merge cannot
// depend on the order of its arguments).
func runShards(t *testing.T, dir string, n int, args ...string) []string {
	t.Helper()
	var parts []string
	for k := n - 1; k >= 0; k-- {
		p := filepath.Join(dir, fmt.Sprintf("%s-%d-of-%d.json", args[0], k, n))
		r := seine(t, append(args, "-shard", fmt.Sprintf("%d/%d", k, n), "-out", p, "-quiet")...)
		require.Equal(t, 0, r.code, "shard %d/%d: %s", k, n, r.stderr)
		require.Empty(t, r.stdout, "a shard with -out writes nothing on standard output")
		parts = append(parts, p)
	}
	return parts
}

// dropKeys returns the JSON text v with every key in drop removed, at any
// depth, re-encoded; numbers are kept as their text, so equal output means
// every other figure is equal bit for bit (the tool writes the shortest
// text that reads back as the same float64).
func dropKeys(t *testing.T, text string, drop ...string) string {
	t.Helper()
	dec := json.NewDecoder(strings.NewReader(text))
	dec.UseNumber()
	var v any
	require.NoError(t, dec.Decode(&v), text)
	var walk func(v any)
	walk = func(v any) {
		switch x := v.(type) {
		case map[string]any:
			for _, k := range drop {
				delete(x, k)
			}
			for _, e := range x {
				walk(e)
			}
		case []any:
			for _, e := range x {
				walk(e)
			}
		}
	}
	walk(v)
	b, err := json.Marshal(v)
	require.NoError(t, err)
	return string(b)
}

// dropColumn returns CSV text without the column named col.
func dropColumn(t *testing.T, text, col string) string {
	t.Helper()
	recs, err := csv.NewReader(strings.NewReader(text)).ReadAll()
	require.NoError(t, err)
	require.NotEmpty(t, recs)
	j := -1
	for i, h := range recs[0] {
		if h == col {
			j = i
		}
	}
	require.GreaterOrEqual(t, j, 0, "no column %q", col)
	var b strings.Builder
	for _, r := range recs {
		b.WriteString(strings.Join(append(append([]string{}, r[:j]...), r[j+1:]...), ",") + "\n")
	}
	return b.String()
}

// TestShardsMergeBitForBit (issue 17): a sweep, a comparison and a
// learning curve run whole and as N = 1, 2, 3 and 7 shards, each shard in
// its own process, merged, give the same figures bit for bit, wall times
// aside. N = 7 leaves some shards without fits, which must merge too.
func TestShardsMergeBitForBit(t *testing.T) {
	for _, tc := range []struct {
		name  string
		args  []string
		times []string // JSON keys holding wall times
		trace bool
	}{
		{"sweep l2", []string{"sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0,0.1,1", "-folds", "2", "-iterations", "5"}, nil, false},
		{"sweep units", []string{"sweep", "-spec", binarySpec, "-data", binaryData, "-units", "1,2", "-holdout", "0.3", "-iterations", "5"}, nil, false},
		{"curve", []string{"curve", "-spec", binarySpec, "-data", binaryData, "-steps", "4", "-iterations", "5"}, nil, false},
		{"compare", []string{"compare", "-spec", binarySpec, "-data", binaryData, "-optimizers", "gd,lbfgs,adam", "-seeds", "2",
			"-iterations", "5", "-holdout", "0.2"}, []string{"seconds", "seconds_to_target"}, true},
		{"compare two problems", []string{"compare", "-spec", binarySpec, "-data", binaryData, "-spec", tagsSpec, "-data", tagsData,
			"-optimizers", "cg,momentum", "-seeds", "2", "-iterations", "4"}, []string{"seconds", "seconds_to_target"}, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			wholeArgs := append(append([]string{}, tc.args...), "-json", "-quiet")
			traceWhole := filepath.Join(dir, "whole.csv")
			if tc.trace {
				wholeArgs = append(wholeArgs, "-trace", traceWhole)
			}
			whole := seine(t, wholeArgs...)
			require.Equal(t, 0, whole.code, whole.stderr)
			text := seine(t, append(append([]string{}, tc.args...), "-quiet")...)
			require.Equal(t, 0, text.code, text.stderr)
			for _, n := range []int{1, 2, 3, 7} {
				parts := runShards(t, dir, n, tc.args...)
				args := []string{"merge", "-json"}
				traceMerged := filepath.Join(dir, fmt.Sprintf("merged-%d.csv", n))
				if tc.trace {
					args = append(args, "-trace", traceMerged)
				}
				merged := seine(t, append(args, parts...)...)
				require.Equal(t, 0, merged.code, "N = %d: %s", n, merged.stderr)
				assert.Equal(t, dropKeys(t, whole.stdout, tc.times...), dropKeys(t, merged.stdout, tc.times...), "N = %d", n)
				if tc.trace {
					a, err := os.ReadFile(traceWhole)
					require.NoError(t, err)
					b, err := os.ReadFile(traceMerged)
					require.NoError(t, err)
					assert.Equal(t, dropColumn(t, string(a), "seconds"), dropColumn(t, string(b), "seconds"), "trace, N = %d", n)
				}
				if n == 3 && tc.times == nil {
					// The table has no wall times: it must match as text.
					mt := seine(t, append([]string{"merge"}, parts...)...)
					require.Equal(t, 0, mt.code, mt.stderr)
					assert.Equal(t, text.stdout, mt.stdout)
					assert.Equal(t, text.stderr, mt.stderr, "warnings")
				}
			}
		})
	}
}

// TestMergePlot: merge draws the plot the whole run draws.
func TestMergePlot(t *testing.T) {
	dir := t.TempDir()
	parts := runShards(t, dir, 2, "sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0,1", "-folds", "2", "-iterations", "3")
	plot := filepath.Join(dir, "sweep.svg")
	r := seine(t, append([]string{"merge", "-plot", plot}, parts...)...)
	require.Equal(t, 0, r.code, r.stderr)
	checkSVG(t, plot)
}

// TestMergeBadParts: parts of another run, a shard missing or given
// twice, and files that are not parts are refused with status 1, naming
// the part; a bad -shard is a usage error (status 2) naming the flag.
func TestMergeBadParts(t *testing.T) {
	dir := t.TempDir()
	args := []string{"sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0,1", "-folds", "2", "-iterations", "3"}
	parts := runShards(t, dir, 3, args...) // 2/3, 1/3, 0/3
	p2, p1, p0 := parts[0], parts[1], parts[2]
	shard := func(name string, args ...string) string {
		p := filepath.Join(dir, name)
		r := seine(t, append(args, "-out", p, "-quiet")...)
		require.Equal(t, 0, r.code, r.stderr)
		return p
	}
	// Another spec: the same net with another λ₁ penalty.
	specText, err := os.ReadFile(binarySpec)
	require.NoError(t, err)
	otherSpec := filepath.Join(dir, "other.yaml")
	require.NoError(t, os.WriteFile(otherSpec, append(specText, []byte("penalty:\n  l1: 0.5\n")...), 0o644))
	fromSpec := shard("spec.json", "sweep", "-spec", otherSpec, "-data", binaryData, "-l2", "0,1", "-folds", "2", "-iterations", "3", "-shard", "1/3")
	// Another data file: one row fewer.
	dataText, err := os.ReadFile(binaryData)
	require.NoError(t, err)
	otherData := filepath.Join(dir, "other.csv")
	lines := strings.SplitAfter(string(dataText), "\n")
	require.NoError(t, os.WriteFile(otherData, []byte(strings.Join(lines[:len(lines)-2], "")), 0o644))
	fromData := shard("data.json", "sweep", "-spec", binarySpec, "-data", otherData, "-l2", "0,1", "-folds", "2", "-iterations", "3", "-shard", "1/3")
	otherIters := shard("iters.json", "sweep", "-spec", binarySpec, "-data", binaryData, "-l2", "0,1", "-folds", "2", "-iterations", "4", "-shard", "1/3")
	otherN := shard("n.json", append(args, "-shard", "1/2")...)
	curvePart := shard("curve.json", "curve", "-spec", binarySpec, "-data", binaryData, "-steps", "2", "-iterations", "3", "-shard", "1/3")
	twice := copyFile(t, p1, dir, "again.json")
	notPart := filepath.Join(dir, "model.json")
	require.NoError(t, os.WriteFile(notPart, []byte(`{"format": "something else"}`), 0o644))
	partText, err := os.ReadFile(p1)
	require.NoError(t, err)
	otherBuild := filepath.Join(dir, "build.json")
	require.NoError(t, os.WriteFile(otherBuild, bytes.Replace(partText, []byte(`"build":"seine `), []byte(`"build":"seine v0.0.1 `), 1), 0o644))
	broken := filepath.Join(dir, "broken.json")
	require.NoError(t, os.WriteFile(broken, []byte(`{"format": "seine-part", "ver`), 0o644))

	for _, tt := range []struct {
		name  string
		parts []string
		want  []string
	}{
		{"another spec", []string{p0, fromSpec, p2}, []string{fromSpec, "another spec", p0}},
		{"another data file", []string{p0, fromData, p2}, []string{fromData, "another data file", p0}},
		{"other settings", []string{p0, otherIters, p2}, []string{otherIters, `-iterations "4"`}},
		{"another N", []string{p0, otherN, p2}, []string{otherN, "shard 1/2", "one of 3"}},
		{"another command", []string{p0, curvePart, p2}, []string{curvePart, "a part of curve"}},
		{"another build", []string{p0, otherBuild, p2}, []string{otherBuild, "another build", "seine v0.0.1"}},
		{"missing", []string{p0, p2}, []string{"shard 1/3 missing"}},
		{"twice", []string{p0, p1, twice, p2}, []string{twice, "shard 1/3 again", p1}},
		{"not a part", []string{p0, notPart}, []string{notPart, `"seine-part"`}},
		{"broken", []string{p0, broken}, []string{broken, "not a part"}},
		{"no such file", []string{p0, filepath.Join(dir, "nope.json")}, []string{"nope.json"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			r := seine(t, append([]string{"merge"}, tt.parts...)...)
			require.Equal(t, 1, r.code, r.stderr)
			oneLineError(t, r.stderr, tt.want...)
			assert.Empty(t, r.stdout)
		})
	}

	for _, tt := range []struct {
		name string
		args []string
		want []string
	}{
		{"K = N", append(args, "-shard", "3/3"), []string{"-shard 3/3", "0 ≤ K < N"}},
		{"K > N", append(args, "-shard", "5/2"), []string{"-shard 5/2"}},
		{"N = 0", append(args, "-shard", "0/0"), []string{"-shard 0/0", "N is 0"}},
		{"negative K", append(args, "-shard", "-1/2"), []string{"-shard -1/2"}},
		{"no slash", append(args, "-shard", "2"), []string{`-shard "2"`, "K/N"}},
		{"env without a runner", append(args, "-shard", "env"), []string{"-shard env", "JOB_COMPLETION_INDEX", "SLURM_ARRAY_TASK_ID"}},
		{"-out without -shard", append(args, "-out", filepath.Join(dir, "x.json")), []string{"-out", "-shard"}},
		{"-plot with -shard", append(args, "-shard", "0/2", "-plot", filepath.Join(dir, "x.png")), []string{"-plot", "seine merge -plot"}},
		{"-l2 and -units", append(args, "-units", "2", "-shard", "0/2"), []string{"-shard", "-l2 or -units"}},
		{"curve K = N", []string{"curve", "-spec", binarySpec, "-data", binaryData, "-shard", "2/2"}, []string{"-shard 2/2"}},
		{"compare N = 0", []string{"compare", "-spec", binarySpec, "-data", binaryData, "-shard", "0/0"}, []string{"-shard 0/0"}},
		{"compare -trace", []string{"compare", "-spec", binarySpec, "-data", binaryData, "-shard", "0/2", "-trace", filepath.Join(dir, "t.csv")}, []string{"-trace"}},
		{"merge nothing", []string{"merge", "-json"}, []string{"part files"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			r := seineEnv(t, []string{"JOB_COMPLETION_INDEX=", "SLURM_ARRAY_TASK_ID="}, tt.args...)
			require.Equal(t, 2, r.code, r.stderr)
			oneLineError(t, r.stderr, tt.want...)
		})
	}
}

// TestShardFromEnvironment: the index (and count) of the common job
// runners, as their documentation names them: Kubernetes Indexed Jobs set
// JOB_COMPLETION_INDEX; Slurm job arrays set SLURM_ARRAY_TASK_ID, _MIN,
// _COUNT and _STEP.
func TestShardFromEnvironment(t *testing.T) {
	for _, tt := range []struct {
		name  string
		value string
		env   map[string]string
		want  diag.Shard
		err   string
	}{
		{"kubernetes", "env/4", map[string]string{"JOB_COMPLETION_INDEX": "3"}, diag.Shard{K: 3, N: 4}, ""},
		{"kubernetes without N", "env", map[string]string{"JOB_COMPLETION_INDEX": "3"}, diag.Shard{}, "env/N"},
		{"kubernetes index too large", "env/3", map[string]string{"JOB_COMPLETION_INDEX": "3"}, diag.Shard{}, "K is 3"},
		{"slurm from 0", "env", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_COUNT": "5"}, diag.Shard{K: 2, N: 5}, ""},
		{"slurm from 1", "env", map[string]string{"SLURM_ARRAY_TASK_ID": "5", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_COUNT": "5"}, diag.Shard{K: 4, N: 5}, ""},
		{"slurm count agrees", "env/5", map[string]string{"SLURM_ARRAY_TASK_ID": "1", "SLURM_ARRAY_TASK_COUNT": "5"}, diag.Shard{K: 1, N: 5}, ""},
		{"slurm count disagrees", "env/4", map[string]string{"SLURM_ARRAY_TASK_ID": "1", "SLURM_ARRAY_TASK_COUNT": "5"}, diag.Shard{}, "not 4"},
		{"slurm step", "env", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_COUNT": "3", "SLURM_ARRAY_TASK_STEP": "2"}, diag.Shard{}, "STEP"},
		{"slurm not a number", "env", map[string]string{"SLURM_ARRAY_TASK_ID": "x", "SLURM_ARRAY_TASK_COUNT": "3"}, diag.Shard{}, `SLURM_ARRAY_TASK_ID is "x"`},
		{"explicit", "1/2", map[string]string{"JOB_COMPLETION_INDEX": "0"}, diag.Shard{K: 1, N: 2}, ""},
	} {
		t.Run(tt.name, func(t *testing.T) {
			got, err := parseShard(tt.value, func(k string) string { return tt.env[k] })
			if tt.err != "" {
				require.Error(t, err)
				assert.Contains(t, err.Error(), tt.err)
				assert.Contains(t, err.Error(), "-shard "+tt.value)
				return
			}
			require.NoError(t, err)
			assert.Equal(t, tt.want, got)
		})
	}
	// Through the tool: a Slurm array task numbered from 1.
	r := seineEnv(t, []string{"SLURM_ARRAY_TASK_ID=2", "SLURM_ARRAY_TASK_MIN=1", "SLURM_ARRAY_TASK_COUNT=3", "JOB_COMPLETION_INDEX="},
		"curve", "-spec", binarySpec, "-data", binaryData, "-steps", "2", "-iterations", "2", "-shard", "env", "-quiet")
	require.Equal(t, 0, r.code, r.stderr)
	var p struct{ K, N int }
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &p))
	assert.Equal(t, 1, p.K)
	assert.Equal(t, 3, p.N)
}
