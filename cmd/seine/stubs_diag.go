package main

// Stubs until the diagnostics commands are written; each file that
// implements a command removes its stub from here.

import "context"

func runCompare(ctx context.Context, e *env, args []string) error { return errNotYet }
func runSweep(ctx context.Context, e *env, args []string) error   { return errNotYet }
func runCurve(ctx context.Context, e *env, args []string) error   { return errNotYet }
