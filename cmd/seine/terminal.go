package main

import "os"

// isTerminal reports whether f is a character device (a terminal) rather
// than a file or a pipe.
func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
