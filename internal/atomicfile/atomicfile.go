// Package atomicfile writes a file so that a reader sees either the whole
// old file or the whole new one, never a part, and nothing the user had is
// lost when writing fails: the one atomic writer of seine, used for model
// files and every file the tool writes.
//
// Write creates a temporary file in the folder of the file's final target,
// writes and syncs it, and renames it over the target; on any failure the
// temporary file is removed and the target is untouched. A path that is a
// symbolic link is written through to the file the link names (the link
// stays a link), and an existing file keeps its permission bits; a new
// file gets 0644.
package atomicfile

import (
	"bufio"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
)

// maxLinks bounds the symbolic links followed from path to the target.
const maxLinks = 40

// Target returns the file that writing to path replaces: path itself, or
// for a symbolic link the file it names, followed through links (up to 40).
func Target(path string) (string, error) {
	p := path
	for range maxLinks {
		fi, err := os.Lstat(p)
		if err != nil || fi.Mode()&fs.ModeSymlink == 0 {
			return p, nil // a missing file is created where p says
		}
		dest, err := os.Readlink(p)
		if err != nil {
			return "", err
		}
		if !filepath.IsAbs(dest) {
			dest = filepath.Join(filepath.Dir(p), dest)
		}
		p = dest
	}
	return "", fmt.Errorf("%s: more than %d symbolic links", path, maxLinks)
}

// Write writes the file at path with write, atomically (see the package
// documentation). The writer given to write is buffered.
func Write(path string, write func(w io.Writer) error) (err error) {
	target, err := Target(path)
	if err != nil {
		return err
	}
	mode := fs.FileMode(0o644)
	if fi, err := os.Stat(target); err == nil {
		if fi.IsDir() {
			return fmt.Errorf("%s is a folder, want a file name", path)
		}
		mode = fi.Mode().Perm()
	}
	dir := filepath.Dir(target)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(target)+".tmp-*")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err = tmp.Chmod(mode); err != nil {
		return err
	}
	bw := bufio.NewWriter(tmp)
	if err = write(bw); err != nil {
		return err
	}
	if err = bw.Flush(); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	if err = os.Rename(tmp.Name(), target); err != nil {
		return err
	}
	if d, derr := os.Open(dir); derr == nil {
		d.Sync() // make the rename durable; not every system supports it
		d.Close()
	}
	return nil
}
