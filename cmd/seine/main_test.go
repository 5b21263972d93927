package main

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The tests run the built tool as a user would: TestMain builds it once into
// a temporary folder and trains one small model on the triage demo that
// many tests read.
var (
	bin        string // the built seine binary
	tmpRoot    string // removed after the tests
	triageSpec = filepath.Join("..", "..", "examples", "triage", "triage.yaml")
	triageData = filepath.Join("..", "..", "examples", "triage", "sessions.csv")
	triageRows = 3000 // data rows of sessions.csv
	baseModel  string // a model trained by TestMain; do not modify
)

func TestMain(m *testing.M) {
	os.Exit(testMain(m))
}

func testMain(m *testing.M) int {
	var err error
	if tmpRoot, err = os.MkdirTemp("", "seine-cmd-test-"); err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	defer os.RemoveAll(tmpRoot)
	bin = filepath.Join(tmpRoot, "seine")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		fmt.Fprintf(os.Stderr, "building seine: %v\n%s", err, out)
		return 1
	}
	baseModel = filepath.Join(tmpRoot, "triage.seine.json")
	r := seine(nil, "train", "-spec", triageSpec, "-data", triageData, "-out", baseModel,
		"-iterations", "60", "-holdout", "0.25", "-quiet")
	if r.code != 0 {
		fmt.Fprintf(os.Stderr, "training the base model: status %d\n%s%s", r.code, r.stdout, r.stderr)
		return 1
	}
	return m.Run()
}

type result struct {
	code           int
	stdout, stderr string
}

// seine runs the built tool with args. t may be nil (in TestMain).
func seine(t testing.TB, args ...string) result {
	if t != nil {
		t.Helper()
	}
	cmd := exec.Command(bin, args...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err := cmd.Run()
	code := 0
	if ee, ok := err.(*exec.ExitError); ok {
		code = ee.ExitCode()
	} else if err != nil {
		if t != nil {
			require.NoError(t, err, "running seine")
		}
		code = -1
	}
	return result{code: code, stdout: out.String(), stderr: errb.String()}
}

// runIn calls run in-process, for fast cases that need no binary.
func runIn(args ...string) result {
	var out, errb bytes.Buffer
	code := run(context.Background(), &env{stdout: &out, stderr: &errb}, args)
	return result{code: code, stdout: out.String(), stderr: errb.String()}
}

// copyFile copies src to a new file in dir and returns its path.
func copyFile(t *testing.T, src, dir, name string) string {
	t.Helper()
	b, err := os.ReadFile(src)
	require.NoError(t, err)
	dst := filepath.Join(dir, name)
	require.NoError(t, os.WriteFile(dst, b, 0o644))
	return dst
}

// oneLineError checks that stderr is exactly one line and holds every want.
func oneLineError(t *testing.T, stderr string, want ...string) {
	t.Helper()
	lines := strings.Split(strings.TrimRight(stderr, "\n"), "\n")
	assert.Len(t, lines, 1, "stderr has %d lines, want 1:\n%s", len(lines), stderr)
	for _, w := range want {
		assert.Contains(t, stderr, w, "stderr lacks %q", w)
	}
	assert.NotContains(t, stderr, "goroutine", "stderr shows a panic")
	assert.NotContains(t, stderr, "panic", "stderr shows a panic")
}

func TestUsage(t *testing.T) {
	tests := []struct {
		name string
		args []string
		code int
		want []string // in stderr
	}{
		{"no command", nil, 2, []string{"Usage:"}},
		{"unknown command", []string{"trian"}, 2, []string{`unknown command "trian"`}},
		{"unknown flag", []string{"train", "-bogus"}, 2, []string{"seine train:", "-bogus", "seine help train"}},
		{"stray argument", []string{"evaluate", "-model", "m", "-data", "d", "extra"}, 2, []string{`unexpected argument "extra"`}},
		{"missing -spec", []string{"train", "-data", "d.csv", "-out", "m.json"}, 2, []string{"-spec is required"}},
		{"bad optimizer", []string{"train", "-spec", "s", "-data", "d", "-out", "o", "-optimizer", "newton"}, 2, []string{`-optimizer "newton"`, "lbfgs"}},
		{"holdout out of range", []string{"train", "-spec", "s", "-data", "d", "-out", "o", "-holdout", "1.5"}, 2, []string{"-holdout 1.5", "(0, 1)"}},
		{"keep-best without holdout", []string{"train", "-spec", "s", "-data", "d", "-out", "o", "-keep-best"}, 2, []string{"-holdout"}},
		{"plot format", []string{"evaluate", "-model", "m", "-data", "d", "-plot", "c.jpg"}, 2, []string{"-plot c.jpg", ".png or .svg"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := runIn(tt.args...)
			require.Equal(t, tt.code, r.code, "status; stderr %q", r.stderr)
			for _, w := range tt.want {
				assert.Contains(t, r.stderr, w, "stderr lacks %q", w)
			}
		})
	}
}

func TestHelp(t *testing.T) {
	for _, c := range []string{"train", "evaluate", "predict", "gradient-check", "inspect"} {
		t.Run(c, func(t *testing.T) {
			r := runIn("help", c)
			assert.Equal(t, 0, r.code, "help %s: status", c)
			assert.Contains(t, r.stdout, "Usage: seine "+c, "help %s: stdout", c)
			r = runIn(c, "-h")
			assert.Equal(t, 0, r.code, "%s -h: status", c)
			assert.Contains(t, r.stdout, "Usage: seine "+c, "%s -h: stdout", c)
		})
	}
}
