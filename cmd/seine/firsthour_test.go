package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Every command has what seine help prints for it: what it reads, what it
// writes and an example; the top-level help lists them all.
func TestHelpListsFilesAndExamples(t *testing.T) {
	top := runIn("help")
	require.Equal(t, 0, top.code)
	for _, c := range commandList() {
		d, ok := usageDocs[c.name]
		require.True(t, ok, "command %s has no usage doc", c.name)
		assert.True(t, strings.HasPrefix(d.example, "seine "+c.name), "%s: example %q", c.name, d.example)
		assert.Contains(t, top.stdout, "example: "+d.example)
		r := runIn("help", c.name)
		assert.Equal(t, 0, r.code)
		assert.Contains(t, r.stdout, "reads:   "+d.reads, c.name)
		assert.Contains(t, r.stdout, "writes:  "+d.writes, c.name)
	}
}

func TestVersion(t *testing.T) {
	r := runIn("version")
	require.Equal(t, 0, r.code, r.stderr)
	for _, w := range []string{"seine ", "library   0.2.0", "go        go1.", "platform  ", "matrices  "} {
		assert.Contains(t, r.stdout, w)
	}
}

// The completion scripts name every command and every flag of every
// command (they are made from the table), and the shells present on this
// machine accept their syntax.
func TestCompletion(t *testing.T) {
	for _, sh := range []string{"bash", "zsh", "fish"} {
		r := runIn("completion", sh)
		require.Equal(t, 0, r.code, r.stderr)
		for _, c := range completionTable() {
			assert.Contains(t, r.stdout, c.name, "%s script", sh)
			for _, f := range c.flags {
				assert.Contains(t, r.stdout, f.name, "%s script, %s -%s", sh, c.name, f.name)
			}
		}
		if path, err := exec.LookPath(sh); err == nil {
			p := filepath.Join(t.TempDir(), "seine."+sh)
			require.NoError(t, os.WriteFile(p, []byte(r.stdout), 0o644))
			out, err := exec.Command(path, "-n", p).CombinedOutput()
			assert.NoError(t, err, "%s -n: %s", sh, out)
		}
	}
	train := completionTable()
	var flags []string
	for _, c := range train {
		if c.name == "train" {
			for _, f := range c.flags {
				flags = append(flags, f.name)
			}
		}
	}
	assert.Subset(t, flags, []string{"spec", "data", "out", "holdout", "comma", "calibrate", "threshold-rule"})
	assert.Equal(t, 2, runIn("completion", "tcsh").code)
	assert.Equal(t, 2, runIn("completion").code)
}

// A boolean flag given its value as a separate argument gets a message
// with the form that works; -comma takes ';' and tab.
func TestFlagSlips(t *testing.T) {
	r := runIn("train", "-spec", "x.yaml", "-data", "x.csv", "-out", "m.json", "-standardize", "false")
	assert.Equal(t, 2, r.code)
	assert.Contains(t, r.stderr, "write -standardize=false")
	r = runIn("train", "-spec", "x.yaml", "-data", "x.csv", "-out", "m.json", "-comma", ";;")
	assert.Equal(t, 2, r.code)
	assert.Contains(t, r.stderr, "-comma")
	var c commaValue
	require.NoError(t, c.Set("tab"))
	assert.Equal(t, '\t', rune(c))
	require.NoError(t, c.Set(";"))
	assert.Equal(t, "';'", "'"+c.String()+"'")
}
