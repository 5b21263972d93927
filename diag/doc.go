// Package diag holds the diagnostics people look at: optimizer
// comparisons, performance profiles, penalty sweeps and learning curves.
//
// The types here compute numbers only; drawing them is left to the
// caller (the seine tool draws them with its internal chart package).
// Nothing in diag opens files or prints.
package diag
