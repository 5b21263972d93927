package diag

import (
	"fmt"
	"slices"
	"time"
)

// Shard selects one of N parts of a sweep, comparison or learning curve,
// so that a job runner can spread the fits over N processes. Every run
// enumerates its fits in one fixed order, documented with each function
// (SweepPenalty: value × fold; Compare: seed × method; LearningCurve:
// size), and shard K of N runs the fits whose index i in that order has
// i mod N = K. Each fit is deterministic from its own seed and rows, so
// the fits of the N shards, merged (MergeSweeps, MergeComparisons,
// MergeCurves), give the whole run's result bit for bit, wall times
// aside.
//
// The zero value (N = 0) means the whole run, not a part. N = 1 is a part
// that holds every fit.
type Shard struct {
	K, N int
}

// String returns "K/N".
func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.K, s.N) }

// Whole reports whether s is the zero value: the whole run, not a part.
func (s Shard) Whole() bool { return s == Shard{} }

func (s Shard) check() error {
	if s.Whole() {
		return nil
	}
	if s.N < 1 || s.K < 0 || s.K >= s.N {
		return fmt.Errorf("%w: Shard %d/%d, want 0 ≤ K < N (or 0/0 for the whole run)", ErrOptions, s.K, s.N)
	}
	return nil
}

// has reports whether fit i belongs to s.
func (s Shard) has(i int) bool { return s.N == 0 || i%s.N == s.K }

// Count returns how many of the size fits of a run belong to s.
func (s Shard) Count(size int) int {
	switch {
	case s.N == 0:
		return size
	case s.K >= size:
		return 0
	}
	return (size-1-s.K)/s.N + 1
}

// FitDone reports one finished fit of a sweep, comparison or learning
// curve to the Progress callback of its config. It is called on the
// goroutine of the run, after the fit and before the next one starts; a
// slow callback slows the run but changes none of its figures.
type FitDone struct {
	// Index is the fit's place in the run's order (see Shard); Done the
	// number of fits this run (or shard) has finished, this one included,
	// and Total the number it will run: Done = Total at the last one.
	Index, Done, Total int
	// Lambda is the penalty strength λ (penalty.l2) the fit trained with,
	// and Units the units of its first hidden layer (0 without one);
	// sweeps and curves.
	Lambda float64
	Units  int
	// Fold is the 0-based fold validated on, of Folds (a sweep; Folds is
	// 1 with a holdout, 0 elsewhere).
	Fold, Folds int
	// Method and Seed name a comparison's run.
	Method string
	Seed   uint64
	// Rows is the number of rows the fit trained on.
	Rows int
	// Elapsed is the wall time since the run started.
	Elapsed time.Duration
}

// PartError is an error of MergeSweeps, MergeCurves or MergeComparisons
// that blames one of the parts: Part is its index in the parts given. Its
// message, which starts with ErrOptions's, calls that part, and any other
// it is compared with, "part i"; Named gives the same message with the
// parts called what the caller likes, such as the files they were read
// from. The merge functions return it as it is, not wrapped, so Named is
// the whole message:
//
//	var pe *diag.PartError
//	if errors.As(err, &pe) {
//		fmt.Println(pe.Named(func(i int) string { return files[i] }))
//	}
//
// It wraps ErrOptions.
type PartError struct {
	Part int

	format string
	args   []any // a partRef is a part, named by Named
}

// partRef is a part mentioned in a PartError's message, by its index.
type partRef int

// partErrorf returns a PartError that blames part i; format and args are
// its message after ErrOptions's, with a partRef (formatted with %s) for
// each part it mentions.
func partErrorf(i int, format string, args ...any) *PartError {
	return &PartError{Part: i, format: format, args: args}
}

// Error returns the message with the parts called "part i".
func (e *PartError) Error() string {
	return e.Named(func(i int) string { return fmt.Sprintf("part %d", i) })
}

// Named returns the message with each part it mentions called name(i), i
// its index in the parts given, instead of "part i".
func (e *PartError) Named(name func(i int) string) string {
	args := slices.Clone(e.args)
	for j, a := range args {
		if r, ok := a.(partRef); ok {
			args[j] = name(int(r))
		}
	}
	return fmt.Sprintf("%v: %s", ErrOptions, fmt.Sprintf(e.format, args...))
}

// Unwrap returns ErrOptions.
func (e *PartError) Unwrap() error { return ErrOptions }

// checkShards checks that parts, none nil and one per shard of the same
// N, hold each shard 0 … N−1 exactly once; shard returns a part's Shard.
func checkShards[T any](parts []*T, shard func(*T) Shard) error {
	for i, p := range parts {
		if p == nil {
			return partErrorf(i, "%s is nil", partRef(i))
		}
	}
	if len(parts) == 0 {
		return fmt.Errorf("%w: no parts to merge", ErrOptions)
	}
	N := shard(parts[0]).N
	seen := make([]int, max(N, 0)) // N < 0 is reported for part 0 below
	for i, p := range parts {
		s := shard(p)
		switch {
		case s.Whole():
			return partErrorf(i, "%s is a whole run, not a shard", partRef(i))
		case s.N != N:
			return partErrorf(i, "%s is shard %s, %s is one of %d", partRef(i), s, partRef(0), N)
		case s.check() != nil:
			return partErrorf(i, "%s: shard %s, want 0 ≤ K < N", partRef(i), s)
		case seen[s.K] > 0:
			return partErrorf(i, "%s is shard %s, as is %s", partRef(i), s, partRef(seen[s.K]-1))
		}
		seen[s.K] = i + 1
	}
	for k, p := range seen {
		if p == 0 {
			return fmt.Errorf("%w: shard %d/%d is missing", ErrOptions, k, N)
		}
	}
	return nil
}
