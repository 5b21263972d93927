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
