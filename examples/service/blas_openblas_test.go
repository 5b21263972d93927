//go:build openblas

package main

// pureGo is false in the OpenBLAS build, whose products round differently
// in the last bits from the pure-Go build that generated the model.
const pureGo = false
