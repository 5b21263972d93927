package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func text(s string) func(io.Writer) error {
	return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
}

func TestWriteNewAndReplace(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "m.json")
	require.NoError(t, Write(p, text("one")))
	b, _ := os.ReadFile(p)
	assert.Equal(t, "one", string(b))
	require.NoError(t, Write(p, text("two")))
	b, _ = os.ReadFile(p)
	assert.Equal(t, "two", string(b))
	left, _ := filepath.Glob(filepath.Join(dir, ".*tmp-*"))
	assert.Empty(t, left, "no temporary file left behind")
}

// A failing write leaves the old file as it was and no temporary file.
func TestWriteFailureKeepsOld(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "m.json")
	require.NoError(t, Write(p, text("old")))
	boom := errors.New("boom")
	err := Write(p, func(w io.Writer) error { io.WriteString(w, "half"); return boom })
	assert.ErrorIs(t, err, boom)
	b, _ := os.ReadFile(p)
	assert.Equal(t, "old", string(b))
	left, _ := filepath.Glob(filepath.Join(dir, ".*tmp-*"))
	assert.Empty(t, left)
}

// Writing through a symbolic link replaces the file it names, atomically
// in that file's folder, and the link stays a link (issue 13: `-out
// current.json` where current.json links to a versioned model). A private
// file stays private.
func TestWriteThroughLinkKeepsMode(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("symbolic links need privileges on Windows")
	}
	dir := t.TempDir()
	versions := filepath.Join(dir, "versions")
	require.NoError(t, os.Mkdir(versions, 0o755))
	v1 := filepath.Join(versions, "m-v1.json")
	require.NoError(t, os.WriteFile(v1, []byte("v1"), 0o600))
	link := filepath.Join(dir, "current.json")
	require.NoError(t, os.Symlink(filepath.Join("versions", "m-v1.json"), link))

	require.NoError(t, Write(link, text("v2")))
	fi, err := os.Lstat(link)
	require.NoError(t, err)
	assert.NotZero(t, fi.Mode()&os.ModeSymlink, "the link is still a link")
	b, _ := os.ReadFile(v1)
	assert.Equal(t, "v2", string(b), "the target was replaced")
	st, err := os.Stat(v1)
	require.NoError(t, err)
	assert.Equal(t, os.FileMode(0o600), st.Mode().Perm(), "the mode was kept")

	tgt, err := Target(link)
	require.NoError(t, err)
	assert.Equal(t, v1, tgt)
	require.NoError(t, os.Symlink("loop", filepath.Join(dir, "loop")))
	_, err = Target(filepath.Join(dir, "loop"))
	assert.Error(t, err)
	assert.Error(t, Write(dir, text("x")), "a folder is refused")
}
