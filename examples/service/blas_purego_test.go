//go:build !openblas

package main

// pureGo is true in the default build, the one that generated the model.
const pureGo = true
