package data

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
)

// PCG stream constants: Split and Folds given one seed draw independent
// orders.
const (
	splitStream = 0x5e1e_5b17
	foldStream  = 0x5e1e_f01d
)

// strata groups row indices by the row's class (Set.Labels); rows of a
// multi-label set with no class form their own stratum, and a set without
// labels is one stratum. Strata come in class order, rows ascending.
func strata(s *Set) [][]int {
	n := s.Rows()
	labels := s.Labels()
	if labels == nil {
		all := make([]int, n)
		for i := range all {
			all[i] = i
		}
		return [][]int{all}
	}
	groups := make([][]int, len(s.Classes)+1) // index 0 holds label −1
	for i, k := range labels {
		groups[k+1] = append(groups[k+1], i)
	}
	return slices.DeleteFunc(groups, func(g []int) bool { return len(g) == 0 })
}

// SplitIndices is Split returning ascending row indices instead of sets.
func SplitIndices(s *Set, holdout float64, seed uint64) (train, hold []int, err error) {
	if math.IsNaN(holdout) || holdout <= 0 || holdout >= 1 {
		return nil, nil, fmt.Errorf("%w, got %g", ErrHoldout, holdout)
	}
	n := s.Rows()
	groups := strata(s)

	// Largest remainder: each stratum gets ⌊h·n_c⌋ holdout rows, and the
	// strata with the largest fractional parts one more, until the total is
	// round(h·n).
	take := make([]int, len(groups))
	frac := make([]float64, len(groups))
	extra := int(math.Round(holdout * float64(n)))
	for c, g := range groups {
		e := holdout * float64(len(g))
		take[c] = int(math.Floor(e))
		frac[c] = e - float64(take[c])
		extra -= take[c]
	}
	order := make([]int, len(groups))
	for c := range order {
		order[c] = c
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(frac[b], frac[a]) })
	for _, c := range order[:max(0, min(extra, len(order)))] {
		take[c]++
	}

	rng := rand.New(rand.NewPCG(seed, splitStream))
	for c, g := range groups {
		t := min(take[c], len(g)-1) // every class keeps a row in training
		g = slices.Clone(g)
		rng.Shuffle(len(g), func(i, j int) { g[i], g[j] = g[j], g[i] })
		hold = append(hold, g[:t]...)
		train = append(train, g[t:]...)
	}
	if len(hold) == 0 {
		return nil, nil, fmt.Errorf("%w: holdout %g of %d rows leaves no holdout row", ErrTooFewRows, holdout, n)
	}
	slices.Sort(train)
	slices.Sort(hold)
	return train, hold, nil
}

// Split deals the rows of s into a training set and a holdout set,
// stratified by class so that each class's share of holdout rows is within
// one row of holdout × its rows; holdout must be in (0, 1). A class with
// at least one row keeps at least one in training. Rows keep their file
// order within each part. The same seed gives the same split.
func Split(s *Set, holdout float64, seed uint64) (train, hold *Set, err error) {
	tr, ho, err := SplitIndices(s, holdout, seed)
	if err != nil {
		return nil, nil, err
	}
	return s.Subset(tr), s.Subset(ho), nil
}

// Folds deals the row indices of s into k stratified folds, 2 ≤ k ≤ rows:
// every row is in exactly one fold, fold sizes differ by at most one, and
// each class's rows in a fold number ⌊n_c/k⌋ or ⌈n_c/k⌉. Indices in a fold
// are ascending. The same seed gives the same folds.
//
// Method: the rows of each class are shuffled, the classes laid end to end,
// and position p dealt to fold p mod k.
func Folds(s *Set, k int, seed uint64) ([][]int, error) {
	n := s.Rows()
	if k < 2 || k > n {
		return nil, fmt.Errorf("%w: %d folds of %d rows", ErrFolds, k, n)
	}
	rng := rand.New(rand.NewPCG(seed, foldStream))
	folds := make([][]int, k)
	p := 0
	for _, g := range strata(s) {
		g = slices.Clone(g)
		rng.Shuffle(len(g), func(i, j int) { g[i], g[j] = g[j], g[i] })
		for _, i := range g {
			folds[p%k] = append(folds[p%k], i)
			p++
		}
	}
	for _, f := range folds {
		slices.Sort(f)
	}
	return folds, nil
}

// TrainRows returns the rows of every fold but fold k, ascending: the
// training rows when fold k is held out.
func TrainRows(folds [][]int, k int) []int {
	var out []int
	for j, f := range folds {
		if j != k {
			out = append(out, f...)
		}
	}
	slices.Sort(out)
	return out
}
