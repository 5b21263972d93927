//go:build unix

package main

import (
	"bytes"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/creack/pty"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// installFromModulePath installs the tool the way the README says
// (`go install github.com/seine-ml/seine/cmd/seine`), from a module that
// requires seine through a replace to this checkout, since the published
// module cannot be fetched here. It returns the binary.
func installFromModulePath(t *testing.T) string {
	t.Helper()
	root, err := filepath.Abs(filepath.Join("..", ".."))
	require.NoError(t, err)
	mod := t.TempDir()
	gomod := "module firstsession\n\ngo 1.26\n\nrequire github.com/seine-ml/seine v0.0.0\n\nreplace github.com/seine-ml/seine => " + root + "\n"
	require.NoError(t, os.WriteFile(filepath.Join(mod, "go.mod"), []byte(gomod), 0o644))
	sum, err := os.ReadFile(filepath.Join(root, "go.sum"))
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(mod, "go.sum"), sum, 0o644))
	// A blank import keeps the requirement in a module with no code.
	require.NoError(t, os.WriteFile(filepath.Join(mod, "tools.go"), []byte("//go:build tools\n\npackage tools\n\nimport _ \"github.com/seine-ml/seine/cmd/seine\"\n"), 0o644))
	gobin := filepath.Join(mod, "bin")
	cmd := exec.Command("go", "install", "-mod=mod", "github.com/seine-ml/seine/cmd/seine")
	cmd.Dir = mod
	cmd.Env = append(os.Environ(), "GOBIN="+gobin)
	out, err := cmd.CombinedOutput()
	require.NoError(t, err, "go install: %s", out)
	return filepath.Join(gobin, "seine")
}

// TestFirstSession runs a newcomer's first session as the README tells it:
// install, train the demo, evaluate, predict, sweep, a slip or two; and
// checks the progress lines, the warnings and the exit statuses (issue 12).
func TestFirstSession(t *testing.T) {
	if testing.Short() {
		t.Skip("installs the tool and trains the demo")
	}
	seineBin := installFromModulePath(t)
	dir := readmeDir(t)
	run := func(args ...string) (code int, stdout, stderr string) {
		cmd := exec.Command(seineBin, args...)
		cmd.Dir = dir
		var o, e bytes.Buffer
		cmd.Stdout, cmd.Stderr = &o, &e
		err := cmd.Run()
		if ee, ok := err.(*exec.ExitError); ok {
			return ee.ExitCode(), o.String(), e.String()
		}
		require.NoError(t, err)
		return 0, o.String(), e.String()
	}

	code, out, _ := run("version")
	require.Equal(t, 0, code)
	assert.Contains(t, out, "github.com/seine-ml/seine")

	code, out, errs := run("train", "-spec", "examples/triage/triage.yaml", "-data", "examples/triage/sessions.csv", "-out", "triage.seine.json", "-holdout", "0.25")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "21 → 24 tanh → 5 softmax, 653 params")
	// Standard error is a pipe here: plain progress lines, no redraws.
	assert.Regexp(t, regexp.MustCompile(`(?m)^iteration 1/300: cost [0-9.]+, holdout accuracy [0-9.]+%, [0-9.]+s$`), errs)
	assert.NotContains(t, errs, "\r")

	code, out, errs = run("evaluate", "-model", "triage.seine.json", "-data", "examples/triage/sessions.csv")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, out, "macro ROC area")

	code, _, errs = run("predict", "-model", "triage.seine.json", "-data", "examples/triage/sessions.csv", "-out", "p.csv")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, errs, "wrote 3000 rows to p.csv")

	code, out, errs = run("sweep", "-spec", "examples/triage/triage.yaml", "-data", "examples/triage/sessions.csv", "-l2", "0.01,0.1", "-iterations", "20", "-folds", "2")
	require.Equal(t, 0, code, errs)
	assert.NotEmpty(t, out)
	// A plain line per finished fit (2 values × 2 folds), and a warning:
	// the best λ of so short a run sits at an edge of this grid.
	assert.Regexp(t, regexp.MustCompile(`(?m)^sweep: fit 4/4 \(λ = [0-9.]+, fold 2/2\) done: [0-9.]+s`), errs)
	assert.Contains(t, errs, "extend -l2")

	// A class with too few rows: a warning, and the run still succeeds.
	few := "req_per_min,agent_family,error_share,distinct_paths,asset_share,login_attempts,login_fail_share,interval_cv,session_min,night_share,robots_fetched,referer_share,header_count,resp_kb,head_share,path_depth,revisit_share,kind\n"
	raw, err := os.ReadFile(filepath.Join(dir, "examples", "triage", "sessions.csv"))
	require.NoError(t, err)
	lines := strings.Split(string(raw), "\n")
	monitors := 0
	for _, l := range lines[1:] {
		if l == "" || (strings.HasSuffix(l, ",monitor") && monitors == 3) {
			continue
		}
		if strings.HasSuffix(l, ",monitor") {
			monitors++
		}
		few += l + "\n"
	}
	require.NoError(t, os.WriteFile(filepath.Join(dir, "few.csv"), []byte(few), 0o644))
	code, _, errs = run("train", "-spec", "examples/triage/triage.yaml", "-data", "few.csv", "-out", "few.seine.json", "-iterations", "5", "-quiet")
	require.Equal(t, 0, code, errs)
	assert.Contains(t, errs, `warning: class "monitor" has only 3 training rows`)

	// Slips: a separate boolean value is bad usage (2); a missing file is a
	// failure of the work (1), and nothing is written.
	code, _, errs = run("train", "-spec", "examples/triage/triage.yaml", "-data", "few.csv", "-out", "x.json", "-standardize", "false")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "-standardize=false")
	code, _, errs = run("evaluate", "-model", "missing.seine.json", "-data", "few.csv")
	assert.Equal(t, 1, code)
	assert.Contains(t, errs, "model file missing.seine.json")
}

// TestProgressOnTerminal runs train under a pseudo-terminal: the progress
// line redraws in place (carriage returns, no new line between redraws)
// and leaves one clean final line before the summary.
func TestProgressOnTerminal(t *testing.T) {
	if testing.Short() {
		t.Skip("trains the demo")
	}
	dir := readmeDir(t)
	cmd := exec.Command(bin, "train", "-spec", "examples/triage/triage.yaml", "-data", "examples/triage/sessions.csv", "-out", "t.seine.json", "-optimizer", "gd", "-rate", "0.05", "-iterations", "3000")
	cmd.Dir = dir
	var stdout bytes.Buffer
	cmd.Stdout = &stdout
	tty, err := pty.Start(cmd) // standard error (and input) on the terminal
	if err != nil {
		t.Skipf("no pseudo-terminal here: %v", err)
	}
	defer tty.Close()
	var screen bytes.Buffer
	done := make(chan struct{})
	go func() { io.Copy(&screen, tty); close(done) }()
	require.NoError(t, cmd.Wait())
	select {
	case <-done:
	case <-time.After(5 * time.Second):
	}
	s := screen.String()
	redraws := strings.Count(s, "\r[")
	assert.Greater(t, redraws, 1, "the bar is redrawn in place: %q", s)
	// The last redraw shows the whole run and ends its line once.
	last := s[strings.LastIndex(s, "\r[")+1:]
	assert.Regexp(t, `^\[#{20}\]  3000/3000  cost [0-9.]+  [0-9.]+s *\r?\n$`, last)
	assert.Contains(t, stdout.String(), "stopped       reached the iteration limit")
}
