//go:build linux

package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// peakRSS runs the tool under /usr/bin/time -v and returns its status and
// peak resident memory in bytes ("Maximum resident set size", kilobytes).
// time forks from a small process, so the figure is the tool's own: a
// child started straight from this test would also count the test's pages
// shared at fork.
func peakRSS(t *testing.T, args ...string) (int, int64) {
	t.Helper()
	timeBin := "/usr/bin/time"
	if _, err := os.Stat(timeBin); err != nil {
		t.Skip("no /usr/bin/time (Debian package time; CI installs it)")
	}
	cmd := exec.Command(timeBin, append([]string{"-v", bin}, args...)...)
	var errb bytes.Buffer
	cmd.Stderr = &errb
	err := cmd.Run()
	code := 0
	if ee, ok := err.(*exec.ExitError); ok {
		code = ee.ExitCode()
	} else {
		require.NoError(t, err)
	}
	m := regexp.MustCompile(`Maximum resident set size \(kbytes\): (\d+)`).FindStringSubmatch(errb.String())
	require.NotNil(t, m, errb.String())
	kb, err := strconv.ParseInt(m[1], 10, 64)
	require.NoError(t, err)
	return code, kb << 10
}

// Reading a model costs at most twice its size plus a small constant, and
// a stream that is not a model costs only the constant (issue 13: a 256 MB
// file peaked at 1.6 GB, inspect -model /dev/zero at 600 MB). The constant,
// 40 MB, is the tool's own footprint (12 MB measured for inspect of a tiny
// model) with room for the runtime's heap slack.
func TestModelReadMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("writes a 21 MB model")
	}
	const slack = 40 << 20
	// 1000 → 2000 → 10: 2,022,010 params, a model file of about 21 MB (the
	// params' 16 MB in base64).
	s := &spec.Network{Version: 1, Inputs: 1000, Hidden: []spec.Layer{{Units: 2000, Activation: spec.Tanh}},
		Output: spec.Output{Classes: []string{"0", "1", "2", "3", "4", "5", "6", "7", "8", "9"}, Activation: spec.Softmax},
		Init:   spec.Init{Scheme: spec.GlorotUniform, Seed: 1}}
	net, err := nn.Compile(s)
	require.NoError(t, err)
	m, err := nn.NewModel(s, net.NewParams(), nil, nil)
	require.NoError(t, err)
	path := filepath.Join(t.TempDir(), "big.seine.json")
	require.NoError(t, m.Save(path))
	fi, err := os.Stat(path)
	require.NoError(t, err)

	code, rss := peakRSS(t, "inspect", "-model", path)
	require.Equal(t, 0, code)
	t.Logf("inspect of a %d MB model: peak RSS %d MB", fi.Size()>>20, rss>>20)
	assert.LessOrEqual(t, rss, 2*fi.Size()+slack)

	code, rss = peakRSS(t, "inspect", "-model", "/dev/zero")
	assert.Equal(t, 1, code)
	t.Logf("inspect -model /dev/zero: peak RSS %d MB", rss>>20)
	assert.LessOrEqual(t, rss, int64(slack))
}

// Training holds the data once as read and once encoded, with the
// workspaces and optimizer state that inspect estimates, and its peak
// resident memory stays within 25% of that estimate (issue 13: one
// iteration on 10⁶ rows peaked at 1.7 GB; 200,000 triage rows at 217 MB
// against an estimate of 80 MB). The rows come from the SYNTHETIC triage
// generator; 200,000 of them make a 21 MB CSV.
func TestTrainMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("writes and trains on a 21 MB CSV")
	}
	dir := t.TempDir()
	csv := filepath.Join(dir, "big.csv")
	gen := exec.Command("go", "run", "../../examples/triage/gen", "-rows", "200000", "-out", csv)
	out, err := gen.CombinedOutput()
	require.NoError(t, err, string(out))
	model := filepath.Join(dir, "m.seine.json")
	for _, tc := range []struct {
		name string
		args []string
	}{
		{"all rows", nil},
		{"holdout", []string{"-holdout", "0.2"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			args := append([]string{"train", "-spec", "../../examples/triage/triage.yaml", "-data", csv,
				"-label", "kind", "-iterations", "5", "-quiet", "-out", model}, tc.args...)
			code, rss := peakRSS(t, args...)
			require.Equal(t, 0, code)
			var stdout bytes.Buffer
			cmd := exec.Command(bin, "inspect", "-model", model)
			cmd.Stdout = &stdout
			require.NoError(t, cmd.Run())
			m := regexp.MustCompile(`peak about ([0-9.]+) MiB`).FindStringSubmatch(stdout.String())
			require.NotNil(t, m, stdout.String())
			est, err := strconv.ParseFloat(m[1], 64)
			require.NoError(t, err)
			got := float64(rss) / (1 << 20)
			t.Logf("train on 200,000 rows (%s): peak RSS %.1f MiB, inspect's estimate %.1f MiB", tc.name, got, est)
			assert.LessOrEqual(t, got, 1.25*est, "peak RSS above the estimate by more than 25%")
			// The estimate must not be loose either: what it counts is held.
			assert.GreaterOrEqual(t, got, 0.75*est, "peak RSS far below the estimate")
		})
	}
}

// The row guess follows the lines of a file's first MiB, and is bounded by
// the file's size over the columns a row must have, so that a file whose
// first MiB is blank lines cannot make train set aside more room than 8
// bytes per byte of the file.
func TestRowsGuess(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, b []byte) string {
		p := filepath.Join(dir, name)
		require.NoError(t, os.WriteFile(p, b, 0o644))
		return p
	}
	line := []byte("1.5,2.25,3,kind\n") // 16 bytes
	regular := write("regular.csv", bytes.Repeat(line, 200_000))
	assert.Equal(t, 200_000, rowsGuess(regular, 4))
	blank := write("blank.csv", append(bytes.Repeat([]byte("\n"), 2<<20), bytes.Repeat(line, 1000)...))
	assert.Equal(t, (2<<20+16_000)/4, rowsGuess(blank, 4), "capped at size/columns")
	assert.Zero(t, rowsGuess(write("small.csv", line), 4), "too small to need a guess")
	assert.Zero(t, rowsGuess(filepath.Join(dir, "absent.csv"), 4))
	assert.Zero(t, rowsGuess(dir, 4), "not a regular file")
}
