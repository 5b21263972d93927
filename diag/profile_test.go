package diag

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The hand-computed table below follows the definitions of Dolan & Moré
// (2002), "Benchmarking optimization software with performance profiles",
// Math. Programming 91, eqs. (1)–(2): r_{p,s} = t_{p,s}/min_s t_{p,s} and
// ρ_s(τ) = |{p : r_{p,s} ≤ τ}|/n_p, with r = ∞ for a failure.
//
//	problem | A    B    C    | min | r_A  r_B  r_C
//	p1      | 10   20   40   | 10  | 1    2    4
//	p2      | 30   15   15   | 15  | 2    1    1     (B and C tie)
//	p3      | Inf  50   25   | 25  | ∞    2    1
//	p4      | Inf  NaN  -1   | –   | ∞    ∞    ∞     (nobody solved it)
//
// Breakpoints τ ∈ {1, 2, 4}; n_p = 4.
//
//	ρ_A: τ=1 {p1} 1/4;        τ=2 {p1,p2} 2/4;    τ=4 2/4
//	ρ_B: τ=1 {p2} 1/4;        τ=2 {p1,p2,p3} 3/4; τ=4 3/4
//	ρ_C: τ=1 {p2,p3} 2/4;     τ=2 2/4;            τ=4 {p1,p2,p3} 3/4
var handTable = [][]float64{
	{10, 20, 40},
	{30, 15, 15},
	{math.Inf(1), 50, 25},
	{math.Inf(1), math.NaN(), -1},
}

func TestProfileHand(t *testing.T) {
	p, err := NewProfile([]string{"A", "B", "C"}, handTable)
	require.NoError(t, err)
	// Breakpoints worked by hand above (Dolan & Moré 2002 definitions).
	wantTaus := []float64{1, 2, 4}
	require.Equal(t, wantTaus, p.Taus, "Taus")
	// Rho worked by hand above; fractions of 4 are exact in float64.
	wantRho := [][]float64{
		{0.25, 0.5, 0.5},
		{0.25, 0.75, 0.75},
		{0.5, 0.5, 0.75},
	}
	require.Equal(t, wantRho, p.Rho, "Rho")

	tests := []struct {
		name string
		s    int
		tau  float64
		want float64
	}{
		{"below one", 0, 0.5, 0},
		{"A at 1: wins p1", 0, 1, 0.25},
		{"A between steps", 0, 1.5, 0.25},
		{"A at 2", 0, 2, 0.5},
		{"A far out: solved 2 of 4", 0, 1e9, 0.5},
		{"B at 1: tie on p2 counts", 1, 1, 0.25},
		{"C at 1: tie on p2 counts", 2, 1, 0.5},
		{"C just below 4", 2, 3.999, 0.5},
		{"C at 4", 2, 4, 0.75},
		{"C at +Inf: solved 3 of 4", 2, math.Inf(1), 0.75},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			// Exact: every value is k/4 read off the hand table.
			assert.Equal(t, tt.want, p.At(tt.s, tt.tau), "At(%d, %g)", tt.s, tt.tau)
		})
	}
}

func TestProfileAtBad(t *testing.T) {
	p, err := NewProfile([]string{"A", "B", "C"}, handTable)
	require.NoError(t, err)
	tests := []struct {
		name string
		s    int
		tau  float64
	}{
		{"solver below 0", -1, 1},
		{"solver past the last", 3, 1},
		{"NaN tau", 0, math.NaN()},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := p.At(tt.s, tt.tau)
			assert.True(t, math.IsNaN(got), "At(%d, %g) = %g, want NaN", tt.s, tt.tau, got)
		})
	}
	var nilp *Profile
	got := nilp.At(0, 1)
	assert.True(t, math.IsNaN(got), "nil At = %g, want NaN", got)
	short := &Profile{Solvers: []string{"A"}, Taus: []float64{1, 2}, Rho: [][]float64{{1}}}
	got = short.At(0, 3)
	assert.True(t, math.IsNaN(got), "short Rho At = %g, want NaN", got)
}

func TestNewProfileErrors(t *testing.T) {
	tests := []struct {
		name    string
		solvers []string
		cost    [][]float64
		want    error
	}{
		{"no solvers", nil, [][]float64{{1}}, ErrNoSolvers},
		{"no problems", []string{"A"}, nil, ErrNoProblems},
		{"empty problems", []string{"A"}, [][]float64{}, ErrNoProblems},
		{"short row", []string{"A", "B"}, [][]float64{{1, 2}, {1}}, ErrRagged},
		{"long row", []string{"A"}, [][]float64{{1, 2}}, ErrRagged},
		{"zero cost", []string{"A", "B"}, [][]float64{{0, 2}}, ErrZeroCost},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p, err := NewProfile(tt.solvers, tt.cost)
			require.ErrorIs(t, err, tt.want)
			assert.Nil(t, p, "profile returned with the error")
		})
	}
}

// TestProfileProperties checks, over seeded random tables, properties
// stated by Dolan & Moré (2002), Section 2: ρ_s is non-decreasing, ρ_s(1)
// is the fraction of problems s wins, and ρ_s(τ) for τ ≥ r_M (the largest
// finite ratio) is the fraction s solves.
func TestProfileProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := range 200 {
		np := 1 + rng.IntN(12)
		ns := 1 + rng.IntN(5)
		cost := make([][]float64, np)
		for p := range cost {
			cost[p] = make([]float64, ns)
			for s := range cost[p] {
				switch u := rng.Float64(); {
				case u < 0.15:
					cost[p][s] = math.Inf(1)
				case u < 0.2:
					cost[p][s] = math.NaN()
				case u < 0.25:
					cost[p][s] = -1
				default:
					// Small integers, so ties happen often.
					cost[p][s] = float64(1 + rng.IntN(6))
				}
			}
		}
		solvers := make([]string, ns)
		for s := range solvers {
			solvers[s] = fmt.Sprint("s", s)
		}
		prof, err := NewProfile(solvers, cost)
		require.NoError(t, err, "trial %d", trial)
		require.Equal(t, 1.0, prof.Taus[0], "trial %d: Taus[0]", trial)
		for i := 1; i < len(prof.Taus); i++ {
			require.Greater(t, prof.Taus[i], prof.Taus[i-1], "trial %d: Taus not strictly increasing: %v", trial, prof.Taus)
		}
		last := prof.Taus[len(prof.Taus)-1]
		for s := range ns {
			wins, solvedBy := 0, 0
			for p := range np {
				if !(cost[p][s] > 0) || math.IsInf(cost[p][s], 1) {
					continue
				}
				solvedBy++
				best := true
				for _, o := range cost[p] {
					if o > 0 && !math.IsInf(o, 1) && o < cost[p][s] {
						best = false
					}
				}
				if best {
					wins++
				}
			}
			// Counts over np are compared to within one ulp-scale slack.
			const tol = 1e-12
			assert.InDelta(t, float64(wins)/float64(np), prof.At(s, 1), tol, "trial %d solver %d: ρ(1), want the share of wins", trial, s)
			assert.InDelta(t, float64(solvedBy)/float64(np), prof.At(s, last), tol, "trial %d solver %d: ρ(r_M), want the share solved", trial, s)
			for i := 1; i < len(prof.Rho[s]); i++ {
				assert.GreaterOrEqual(t, prof.Rho[s][i], prof.Rho[s][i-1], "trial %d solver %d: ρ decreases at τ=%g", trial, s, prof.Taus[i])
			}
			r := prof.Rho[s][len(prof.Rho[s])-1]
			assert.GreaterOrEqual(t, r, 0.0, "trial %d solver %d: ρ outside [0,1]", trial, s)
			assert.LessOrEqual(t, r, 1.0, "trial %d solver %d: ρ outside [0,1]", trial, s)
		}
	}
}

func ExampleNewProfile() {
	// Evaluations three methods needed on four problems; +Inf = failed.
	inf := math.Inf(1)
	cost := [][]float64{
		{10, 20, 40},
		{30, 15, 15},
		{inf, 50, 25},
		{inf, inf, inf},
	}
	p, err := NewProfile([]string{"gd", "cg", "lbfgs"}, cost)
	if err != nil {
		fmt.Println(err)
		return
	}
	for s, name := range p.Solvers {
		fmt.Printf("%-5s ρ(1)=%.4g ρ(2)=%.4g ρ(4)=%.4g\n", name, p.At(s, 1), p.At(s, 2), p.At(s, 4))
	}
	// Output:
	// gd    ρ(1)=0.25 ρ(2)=0.5 ρ(4)=0.5
	// cg    ρ(1)=0.25 ρ(2)=0.75 ρ(4)=0.75
	// lbfgs ρ(1)=0.5 ρ(2)=0.5 ρ(4)=0.75
}
