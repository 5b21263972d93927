package ctxio

import (
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A read blocked on a FIFO whose writer never writes nor closes ends
// within moments of the context's end, with the context's cause.
func TestFIFOUnblocks(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no FIFOs")
	}
	p := filepath.Join(t.TempDir(), "fifo")
	require.NoError(t, syscall.Mkfifo(p, 0o600))
	// Open both ends without blocking: the writer keeps the FIFO open.
	r, err := os.OpenFile(p, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	require.NoError(t, err)
	defer r.Close()
	w, err := os.OpenFile(p, os.O_WRONLY, 0)
	require.NoError(t, err)
	defer w.Close()

	stop := errors.New("stopped by a signal")
	ctx, cancel := context.WithCancelCause(context.Background())
	rd := NewReader(ctx, r)
	defer rd.Close()
	go func() { time.Sleep(50 * time.Millisecond); cancel(stop) }()
	start := time.Now()
	_, err = io.ReadAll(rd)
	assert.ErrorIs(t, err, stop)
	assert.Less(t, time.Since(start), 2*time.Second)
}

// A regular file reads whole before the end, and not at all after.
func TestRegularFile(t *testing.T) {
	p := filepath.Join(t.TempDir(), "f")
	require.NoError(t, os.WriteFile(p, []byte("hello"), 0o644))
	f, err := os.Open(p)
	require.NoError(t, err)
	defer f.Close()
	ctx, cancel := context.WithCancel(context.Background())
	rd := NewReader(ctx, f)
	b, err := io.ReadAll(rd)
	require.NoError(t, err)
	assert.Equal(t, "hello", string(b))
	cancel()
	_, err = rd.Read(make([]byte, 1))
	assert.ErrorIs(t, err, context.Canceled)
	require.NoError(t, rd.Close())
}
