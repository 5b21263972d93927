package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/internal/atomicfile"
	"github.com/seine-ml/seine/internal/ctxio"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// loadSpec reads and checks the spec file at path. Every problem is
// reported as "path:line:column: field: message", one per line.
func loadSpec(ctx context.Context, path string) (*spec.Network, error) {
	if path == "" {
		return nil, usagef("-spec is required")
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, openError("spec", err)
	}
	defer f.Close()
	r := ctxio.NewReader(ctx, f)
	defer r.Close()
	s, err := spec.Parse(r)
	if err != nil {
		return nil, prefixLines(path, err)
	}
	return s, nil
}

// prefixLines puts "path:" in front of every line of err's message, so that
// each problem of a spec.ErrorList names the file. The returned error still
// wraps err.
func prefixLines(path string, err error) error {
	lines := strings.Split(err.Error(), "\n")
	for i, l := range lines {
		if l != "" && l[0] >= '0' && l[0] <= '9' {
			lines[i] = path + ":" + l // "path:3:17: ..."
		} else {
			lines[i] = path + ": " + l // a problem without a position
		}
	}
	return &wrapped{msg: strings.Join(lines, "\n"), err: err}
}

type wrapped struct {
	msg string
	err error
}

func (w *wrapped) Error() string { return w.msg }
func (w *wrapped) Unwrap() error { return w.err }

// dataFor returns the CSV options that read a data file for the net that s
// describes: the spec's classes, its inputs by name with their types and
// missing rules when it lists them (else the count of inputs), its missing
// tokens and its multi-label setting.
func dataFor(s *spec.Network, label string) data.CSVOptions {
	opt := data.CSVOptions{Label: label, Classes: s.Output.Classes, Multilabel: s.Output.Multilabel, MissingTokens: s.MissingTokens}
	if cols := encode.ColumnsFor(s); cols != nil {
		opt.Columns = cols
	} else {
		opt.Inputs = s.Inputs
	}
	return opt
}

// loadData reads the CSV file at path with opt; errors read
// "path: line 7 (row 6), column "x": ...".
func loadData(ctx context.Context, path string, opt data.CSVOptions) (*data.Set, error) {
	if path == "" {
		return nil, usagef("-data is required")
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, openError("data", err)
	}
	defer f.Close()
	r := ctxio.NewReader(ctx, f)
	defer r.Close()
	set, err := data.ReadCSV(r, opt)
	if ctx.Err() != nil {
		return nil, context.Cause(ctx)
	}
	if err != nil {
		return nil, prefixLines(path, err) // one problem per line, each naming the file
	}
	if set.Rows() == 0 {
		return nil, fmt.Errorf("%s: %w", path, data.ErrEmpty)
	}
	return set, nil
}

// loadModel reads the model file at path. A regular file over the model
// size limit is refused from its size, before any of it is read, as by
// nn.Load.
func loadModel(ctx context.Context, path string) (*nn.Model, error) {
	if path == "" {
		return nil, usagef("-model is required")
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, openError("model", err)
	}
	defer f.Close()
	if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() > nn.DefaultMaxModelBytes {
		return nil, fmt.Errorf("%s: %w: %d bytes, more than %d", path, nn.ErrTooLarge, fi.Size(), int64(nn.DefaultMaxModelBytes))
	}
	r := ctxio.NewReader(ctx, f)
	defer r.Close()
	m, err := nn.ReadModel(r)
	if ctx.Err() != nil {
		return nil, context.Cause(ctx)
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return m, nil
}

// openError says which input file could not be opened and why, in one line:
// "model file m.seine.json: no such file or directory".
func openError(what string, err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return fmt.Errorf("%s file %s: %w", what, pe.Path, pe.Err)
	}
	return err
}

// writeAtomic writes a file at path through write without ever leaving a
// half-written file or losing the old one (internal/atomicfile: a synced
// temporary file renamed over the target, written through a symbolic link,
// keeping an existing file's mode).
func writeAtomic(path string, write func(w io.Writer) error) error {
	return atomicfile.Write(path, write)
}

// checkWritable reports early whether a file can be created beside path, so
// that a long run does not fail only at its end. It leaves nothing behind.
func checkWritable(flagName, path string) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".probe-*")
	if err != nil {
		return fmt.Errorf("%s %s: cannot write there: %w", flagName, path, errors.Unwrap(err))
	}
	tmp.Close()
	os.Remove(tmp.Name())
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return fmt.Errorf("%s %s: is a folder, want a file name", flagName, path)
	}
	return nil
}

// sameFile reports whether the paths a and b name one existing file.
func sameFile(a, b string) bool {
	sa, err := os.Stat(a)
	if err != nil {
		return false
	}
	sb, err := os.Stat(b)
	return err == nil && os.SameFile(sa, sb)
}

// refuseOverwrite returns a usage error when the output path outFlag=out
// names one of the inputs, which writing would destroy.
func refuseOverwrite(outFlag, out string, inputs ...string) error {
	for i := 0; i+1 < len(inputs); i += 2 {
		if inputs[i+1] != "" && sameFile(out, inputs[i+1]) {
			return usagef("%s %s is the %s file; refusing to overwrite it", outFlag, out, inputs[i])
		}
	}
	return nil
}
