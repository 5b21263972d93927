package optim

// runVectors is the number of vectors of length n that every run of
// Minimize keeps whatever the method: the current point, its gradient and
// the best point (returned as Result.X).
const runVectors = 3

// StateVectors returns the number of vectors of length n = len(x0) that a
// run of Minimize with m holds: 3 for every run (the current point, its
// gradient and the best point, which becomes Result.X) plus the method's
// own workspace:
//
//	method             own         what
//	GradientDescent    2           trial point and its gradient
//	ConjugateGradient  3           direction d, trial point and its gradient
//	LBFGS              2·Memory+3  the Memory pairs (s, y), direction, trial point and its gradient
//	Momentum           4           velocity v, look-ahead point, the epoch's gradient sum and start point
//	Adam               4           moments m and v, the epoch's gradient sum and start point
//	Gonum              3           cached point and gradient, previous point
//
// so the default LBFGS (Memory 10) holds 26 vectors. A Memory of 0 counts
// as the default; other settings are not checked. Beyond these vectors a
// run holds O(Memory) words and the trace (one Step per iteration, at most
// 1024 preallocated). The caller's x0 is not counted, and neither is what
// the objective keeps or, for Gonum, what the gonum method keeps. A nil m
// gives 0. TestStateVectors measures these figures against the bytes that
// Minimize allocates.
func StateVectors(m Method) int {
	if m == nil {
		return 0
	}
	return runVectors + m.vectors()
}

func (m *GradientDescent) vectors() int   { return 2 }                // xt, gt
func (m *ConjugateGradient) vectors() int { return 3 }                // d, xt, gt
func (m *Momentum) vectors() int          { return 2 + epochVectors } // v, ahd
func (m *Adam) vectors() int              { return 2 + epochVectors } // m, v
func (m *Gonum) vectors() int             { return 3 }                // cx, cg, prev

// vectors counts s and y of every pair, and d, xt, gt.
func (m *LBFGS) vectors() int {
	mem := defaultMemory
	if m != nil && m.Memory > 0 {
		mem = m.Memory
	}
	return 2*mem + 3
}

// epochVectors counts epoch.sumG and epoch.start.
const epochVectors = 2
