package main

// Stubs until the commands are written; each file that implements a
// command removes its stub from here.

import (
	"context"
	"errors"
)

var errNotYet = errors.New("not available yet")

func runPredict(ctx context.Context, e *env, args []string) error       { return errNotYet }
func runGradientCheck(ctx context.Context, e *env, args []string) error { return errNotYet }
func runInspect(ctx context.Context, e *env, args []string) error       { return errNotYet }
