// Package ctxio reads files under a context, so that a command stops
// reading within moments of a signal: every Read checks the context first,
// and a read blocked on a pipe or FIFO that no writer closes is woken by a
// read deadline set when the context ends.
package ctxio

import (
	"context"
	"errors"
	"os"
	"time"
)

// Reader reads f until ctx is done; then Read returns ctx's cause (or
// ctx.Err()). Call Close on the Reader (it does not close f) to release the
// context's hook once reading is over.
type Reader struct {
	ctx  context.Context
	f    *os.File
	stop func() bool
}

// NewReader returns a Reader of f under ctx. When ctx ends while a Read is
// blocked in a file that supports deadlines (pipes, FIFOs, sockets), the
// deadline wakes it; a regular file's reads do not block for long, and the
// next Read returns the context's error.
func NewReader(ctx context.Context, f *os.File) *Reader {
	r := &Reader{ctx: ctx, f: f}
	r.stop = context.AfterFunc(ctx, func() {
		_ = f.SetReadDeadline(time.Now()) // os.ErrNoDeadline for regular files: nothing blocks there
	})
	return r
}

// Read reads from the file unless the context is done.
func (r *Reader) Read(p []byte) (int, error) {
	if err := r.ctx.Err(); err != nil {
		return 0, context.Cause(r.ctx)
	}
	n, err := r.f.Read(p)
	if errors.Is(err, os.ErrDeadlineExceeded) && r.ctx.Err() != nil {
		return n, context.Cause(r.ctx)
	}
	return n, err
}

// Stat returns the file's FileInfo, so that a reader that knows the size
// of a regular file can read it into one buffer.
func (r *Reader) Stat() (os.FileInfo, error) { return r.f.Stat() }

// Close releases the context's hook; the file stays open.
func (r *Reader) Close() error {
	r.stop()
	return nil
}
