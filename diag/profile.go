package diag

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
)

// Errors returned by NewProfile.
var (
	// ErrNoSolvers means the solver list is empty.
	ErrNoSolvers = errors.New("diag: no solvers")
	// ErrNoProblems means the cost table has no rows.
	ErrNoProblems = errors.New("diag: no problems")
	// ErrRagged means a row of the cost table does not have one entry per
	// solver.
	ErrRagged = errors.New("diag: cost row length differs from the number of solvers")
	// ErrZeroCost means a solver reported a cost of exactly 0, which makes
	// the performance ratio t/min t undefined.
	ErrZeroCost = errors.New("diag: cost of 0 makes the performance ratio undefined")
)

// Profile is the performance profile of solvers over problems
// (Dolan & Moré 2002, "Benchmarking optimization software with
// performance profiles", Math. Programming 91).
//
// With t_{p,s} the cost solver s needed on problem p, the performance ratio
// is
//
//	r_{p,s} = t_{p,s} / min_{s'} t_{p,s'}
//
// (r_{p,s} = +∞ when s failed on p), and the profile of solver s is the
// fraction of the n_p problems it solved within a factor τ of the best:
//
//	ρ_s(τ) = |{p : r_{p,s} ≤ τ}| / n_p.
//
// ρ_s(1) is the fraction of problems on which s was best (ties count for
// every tied solver), and ρ_s(τ) for large τ is the fraction s solved at
// all. ρ_s is a non-decreasing step function of τ that changes only at the
// finite ratios, so it is stored by its breakpoints.
type Profile struct {
	// Solvers names the solvers, in the order of the cost table's columns.
	Solvers []string
	// Taus holds the breakpoints: 1 followed by every distinct finite
	// ratio greater than 1, sorted ascending.
	Taus []float64
	// Rho[s][i] = ρ_s(Taus[i]), a fraction in [0, 1].
	Rho [][]float64
}

// NewProfile computes the performance profile of solvers from
// cost[p][s], the measure (evaluations, seconds, …; any positive unit,
// the same for the whole table) solver s needed on problem p.
//
// A cost of +Inf, NaN or a negative value means s failed to solve p. A
// problem that no solver solved still counts in n_p but is won by nobody,
// so no ρ_s reaches 1. A cost of exactly 0 is an error (ErrZeroCost):
// clamp timings to the clock's resolution before calling.
//
// NewProfile returns ErrNoSolvers, ErrNoProblems or a wrapped ErrRagged
// (naming the problem) for malformed input. It copies solvers and does not
// keep cost.
func NewProfile(solvers []string, cost [][]float64) (*Profile, error) {
	ns := len(solvers)
	if ns == 0 {
		return nil, ErrNoSolvers
	}
	np := len(cost)
	if np == 0 {
		return nil, ErrNoProblems
	}
	for p, row := range cost {
		if len(row) != ns {
			return nil, fmt.Errorf("diag: problem %d: %d costs for %d solvers: %w", p, len(row), ns, ErrRagged)
		}
		for s, t := range row {
			if t == 0 {
				return nil, fmt.Errorf("diag: problem %d, solver %q: %w", p, solvers[s], ErrZeroCost)
			}
		}
	}

	// ratio[p][s], +Inf for a failure.
	ratio := make([][]float64, np)
	taus := []float64{1}
	for p, row := range cost {
		best := math.Inf(1)
		for _, t := range row {
			if solved(t) && t < best {
				best = t
			}
		}
		r := make([]float64, ns)
		for s, t := range row {
			if !solved(t) || math.IsInf(best, 1) {
				r[s] = math.Inf(1)
				continue
			}
			r[s] = t / best
			if math.IsInf(r[s], 1) {
				continue // t finite but t/best overflowed
			}
			taus = append(taus, r[s])
		}
		ratio[p] = r
	}
	sort.Float64s(taus)
	taus = slices.Compact(taus)

	rho := make([][]float64, ns)
	for s := range rho {
		// count[i] = number of problems with r_{p,s} ≤ taus[i]; fill by
		// adding each problem at the first breakpoint it fits under, then
		// taking a running sum.
		count := make([]int, len(taus))
		for p := range ratio {
			r := ratio[p][s]
			if math.IsInf(r, 1) {
				continue
			}
			i := sort.SearchFloat64s(taus, r) // taus[i] == r, since r is a breakpoint
			count[i]++
		}
		rs := make([]float64, len(taus))
		sum := 0
		for i, c := range count {
			sum += c
			rs[i] = float64(sum) / float64(np)
		}
		rho[s] = rs
	}
	return &Profile{Solvers: slices.Clone(solvers), Taus: taus, Rho: rho}, nil
}

// solved reports whether a cost t stands for a solved problem: finite and
// not negative (0 is rejected earlier).
func solved(t float64) bool {
	return !math.IsNaN(t) && !math.IsInf(t, 0) && t >= 0
}

// At returns ρ_s(τ), the fraction of problems solver s solved within a
// factor τ of the best solver. It is 0 for τ < 1, and NaN when s is not a
// solver index or τ is NaN.
func (p *Profile) At(s int, tau float64) float64 {
	if p == nil || s < 0 || s >= len(p.Rho) || math.IsNaN(tau) {
		return math.NaN()
	}
	// i = number of breakpoints ≤ tau; the last of them gives the step.
	i := sort.Search(len(p.Taus), func(i int) bool { return p.Taus[i] > tau })
	if i == 0 {
		return 0
	}
	if i > len(p.Rho[s]) {
		return math.NaN() // a hand-built Profile with short Rho
	}
	return p.Rho[s][i-1]
}
