// Package synth holds what the generators of the examples' SYNTHETIC data
// share: their command line (the flags -rows, -seed and -out, and a write
// of the CSV file through internal/atomicfile, so that a failed run leaves
// the old file) and the draws they have in common.
package synth

import (
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"

	"github.com/seine-ml/seine/internal/atomicfile"
)

// Main parses -rows (default rows; what names a row in its help), -seed
// (default seed) and -out (default out), and writes the file -out with
// write(w, rows, seed). It exits with status 2 for -rows below 1 and 1
// when the file cannot be written.
func Main(what string, rows int, seed uint64, out string, write func(w io.Writer, rows int, seed uint64) error) {
	n := flag.Int("rows", rows, "number of "+what+" to write")
	s := flag.Uint64("seed", seed, "seed of the random stream")
	path := flag.String("out", out, "CSV file to write")
	flag.Parse()
	if *n < 1 {
		fmt.Fprintln(os.Stderr, "gen: -rows must be at least 1")
		os.Exit(2)
	}
	if err := atomicfile.Write(*path, func(w io.Writer) error { return write(w, *n, *s) }); err != nil {
		fmt.Fprintln(os.Stderr, "gen:", err)
		os.Exit(1)
	}
}

// Poisson draws from the Poisson distribution of mean lambda by Knuth's
// multiplication method (Knuth 1969, The Art of Computer Programming,
// vol. 2, §3.4.1):
// count uniform draws until their product falls to e^−λ. Its cost grows
// with λ; fine for the small means the generators use.
func Poisson(r *rand.Rand, lambda float64) float64 {
	l, k, p := math.Exp(-lambda), 0.0, 1.0
	for {
		p *= r.Float64()
		if p <= l {
			return k
		}
		k++
	}
}
