package main

import (
	"bufio"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// readmeBlocks returns the fenced blocks of the README with the given
// language, in order.
func readmeBlocks(t *testing.T, lang string) []string {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "..", "README.md"))
	require.NoError(t, err)
	defer f.Close()
	var blocks []string
	var cur *strings.Builder
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		switch {
		case cur == nil && line == "```"+lang:
			cur = new(strings.Builder)
		case cur != nil && line == "```":
			blocks = append(blocks, cur.String())
			cur = nil
		case cur != nil:
			cur.WriteString(line + "\n")
		}
	}
	require.NoError(t, sc.Err())
	return blocks
}

// readmeDir makes a working folder like the repository root for the
// README's commands: the examples reachable by the same relative paths.
func readmeDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	ex, err := filepath.Abs(filepath.Join("..", "..", "examples"))
	require.NoError(t, err)
	require.NoError(t, os.Symlink(ex, filepath.Join(dir, "examples")))
	return dir
}

// The README's commands run as written (issue 12): every `seine` line of
// its sh blocks, in order, from a folder laid out like the repository
// root, exits 0. The lines that fetch the published module (go install
// …@latest, go get) and the test and benchmark commands are left out: the
// first-session test installs the same module path from this checkout, and
// CI runs the tests anyway.
func TestReadmeCommands(t *testing.T) {
	if testing.Short() {
		t.Skip("trains and sweeps the demo (about a minute)")
	}
	dir := readmeDir(t)
	ran := 0
	for _, block := range readmeBlocks(t, "sh") {
		for _, line := range strings.Split(block, "\n") {
			line, _, _ = strings.Cut(line, "#")
			fields := strings.Fields(line)
			if len(fields) == 0 || fields[0] != "seine" {
				continue
			}
			cmd := exec.Command(bin, fields[1:]...)
			cmd.Dir = dir
			out, err := cmd.CombinedOutput()
			require.NoError(t, err, "README: %s\n%s", line, out)
			ran++
		}
	}
	assert.GreaterOrEqual(t, ran, 11, "the README's seine commands")
	for _, f := range []string{"triage.seine.json", "confusion.png", "predictions.csv", "cost.png", "sweep.png", "curve.png", "takeover.html", "triage.onnx"} {
		_, err := os.Stat(filepath.Join(dir, f))
		assert.NoError(t, err, "a README command should have written %s", f)
	}

	// The export section's node example, where the other runtime is here
	// (CI installs it; see .ci/run).
	if mods := os.Getenv("SEINE_ONNX_NODE_MODULES"); mods != "" {
		js := readmeBlocks(t, "js")
		require.Len(t, js, 1)
		require.NoError(t, os.WriteFile(filepath.Join(dir, "predict.cjs"), []byte(js[0]), 0o644))
		cmd := exec.Command("node", "predict.cjs")
		cmd.Dir = dir
		cmd.Env = append(os.Environ(), "NODE_PATH="+mods)
		out, err := cmd.CombinedOutput()
		require.NoError(t, err, "%s", out)
		lines := strings.Split(strings.TrimSpace(string(out)), "\n")
		assert.Len(t, lines, 3, "%s", out)
	}
}

// The README's Go programs compile as pasted into a module that requires
// seine (here through a replace to this checkout), and run: the first
// trains and saves the demo model, the second loads it and predicts from
// raw records.
func TestReadmeGoPrograms(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs two programs")
	}
	progs := readmeBlocks(t, "go")
	require.GreaterOrEqual(t, len(progs), 2)
	root, err := filepath.Abs(filepath.Join("..", ".."))
	require.NoError(t, err)
	sum, err := os.ReadFile(filepath.Join(root, "go.sum"))
	require.NoError(t, err)
	dir := readmeDir(t)
	for i, src := range progs {
		require.True(t, strings.HasPrefix(src, "package main\n"), "README Go block %d is not a whole program", i+1)
		mod := filepath.Join(t.TempDir(), "prog")
		require.NoError(t, os.MkdirAll(mod, 0o755))
		gomod := "module readmeprog\n\ngo 1.26\n\nrequire github.com/seine-ml/seine v0.0.0\n\nreplace github.com/seine-ml/seine => " + root + "\n"
		require.NoError(t, os.WriteFile(filepath.Join(mod, "go.mod"), []byte(gomod), 0o644))
		require.NoError(t, os.WriteFile(filepath.Join(mod, "go.sum"), sum, 0o644))
		require.NoError(t, os.WriteFile(filepath.Join(mod, "main.go"), []byte(src), 0o644))
		exe := filepath.Join(mod, "prog")
		build := exec.Command("go", "build", "-mod=mod", "-o", exe, ".")
		build.Dir = mod
		out, err := build.CombinedOutput()
		require.NoError(t, err, "README Go block %d does not compile as pasted:\n%s", i+1, out)
		run := exec.Command(exe)
		run.Dir = dir
		out, err = run.CombinedOutput()
		require.NoError(t, err, "README Go block %d: %s", i+1, out)
		if i == 1 {
			assert.Equal(t, "human\ncrawler\n", string(out), "the service example's two sessions")
		}
	}
}
