package main

// Every core command is written; errNotYet remains for the stubs of the
// diagnostics commands in stubs_diag.go.

import "errors"

var errNotYet = errors.New("not available yet")
