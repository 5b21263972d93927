//go:build unix

package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Every command ends within about a second of SIGINT or SIGTERM, whatever
// it is doing, with status 128 + the signal's number (issue 13): here while
// reading a FIFO whose writer never writes nor closes, and while reading a
// FIFO that never ends.
func TestSignalStopsReading(t *testing.T) {
	for _, tc := range []struct {
		name   string
		sig    syscall.Signal
		status int
		feed   bool // write rows forever
	}{
		{"fifo never closed, SIGTERM", syscall.SIGTERM, 143, false},
		{"endless data, SIGINT", syscall.SIGINT, 130, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			fifo := filepath.Join(dir, "data.csv")
			require.NoError(t, syscall.Mkfifo(fifo, 0o600))
			out := filepath.Join(dir, "m.seine.json")
			cmd := exec.Command(bin, "train", "-spec", triageSpec, "-data", fifo, "-out", out, "-quiet")
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			require.NoError(t, cmd.Start())
			// The writer end: O_RDWR opens without waiting for a reader.
			w, err := os.OpenFile(fifo, os.O_RDWR, 0)
			require.NoError(t, err)
			defer w.Close()
			stop := make(chan struct{})
			if tc.feed {
				all, err := os.ReadFile(triageData)
				require.NoError(t, err)
				head, body, _ := bytes.Cut(all, []byte("\n"))
				go func() {
					if _, err := w.Write(append(head, '\n')); err != nil {
						return
					}
					for {
						select {
						case <-stop:
							return
						default:
						}
						if _, err := w.Write(body); err != nil {
							return
						}
					}
				}()
			}
			defer close(stop)
			time.Sleep(300 * time.Millisecond)
			sent := time.Now()
			require.NoError(t, cmd.Process.Signal(tc.sig))
			err = cmd.Wait()
			took := time.Since(sent)
			assert.Less(t, took, 3*time.Second, "about a second, and the race detector's slack")
			ee, ok := err.(*exec.ExitError)
			require.True(t, ok, "%v", err)
			assert.Equal(t, tc.status, ee.ExitCode(), stderr.String())
			assert.NotContains(t, stderr.String(), "goroutine")
			_, err = os.Stat(out)
			assert.True(t, os.IsNotExist(err), "nothing written")
			left, _ := filepath.Glob(filepath.Join(dir, ".*"))
			assert.Empty(t, left, "no temporary file")
			assert.True(t, strings.Contains(stderr.String(), "stopped by"), stderr.String())
		})
	}
}
