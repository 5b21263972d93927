// Command gen writes the synthetic pump data set of examples/multilabel:
// readings of a centrifugal pump's sensors, each tagged with the faults
// present when it was taken: any of cavitation, bearing-wear, misalignment
// and clogging, several at once, or none (a healthy pump).
//
// THE DATA IS SYNTHETIC. Every reading is drawn from the simple model
// written in this file (a fault shifts some sensors in proportion to its
// severity, on top of the pump's operating point and sensor noise); no
// real pump was measured. Faults co-occur as they tend to: a clogged
// suction strainer starves the pump and makes cavitation likelier, and
// misalignment wears the bearings. A mild fault barely moves the sensors,
// so no classifier can tag every reading right.
//
// Usage:
//
//	go run ./examples/multilabel/gen [-rows 2000] [-seed 20261203] [-out examples/multilabel/readings.csv]
//
// The same seed and row count always give the same file.
package main

import (
	"bufio"
	"io"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/seine-ml/seine/examples/internal/synth"
)

// features lists the columns in file order, with what each one measures.
var features = []struct{ name, meaning string }{
	{"load", "operating point: flow set-point as a share of rated flow"},
	{"flow_m3h", "measured flow in m³/h"},
	{"suction_kpa", "suction pressure in kPa (absolute)"},
	{"discharge_kpa", "discharge pressure in kPa"},
	{"current_a", "motor current in A"},
	{"vib_rms", "overall vibration velocity, RMS, in mm/s"},
	{"vib_1x", "vibration at running speed (1×) in mm/s"},
	{"vib_2x", "vibration at twice running speed (2×) in mm/s"},
	{"vib_axial", "axial vibration velocity, RMS, in mm/s"},
	{"hf_envelope_g", "high-frequency acceleration envelope in g"},
	{"bearing_temp_c", "bearing housing temperature in °C"},
	{"noise_db", "sound level at the casing in dB(A)"},
}

// tags are the fault classes, in the spec's order.
var tags = []string{"cavitation", "bearing-wear", "misalignment", "clogging"}

const (
	cav = iota
	bear
	mis
	clog
)

func main() {
	synth.Main("readings", 2000, 20261203, filepath.Join("examples", "multilabel", "readings.csv"), write)
}

// draw fills f with one reading and returns which faults are present.
func draw(r *rand.Rand, f []float64) (present [4]bool) {
	bern := func(p float64) bool { return r.Float64() < p }
	present[clog] = bern(0.15)
	present[mis] = bern(0.15)
	present[cav] = bern(0.10)
	if present[clog] {
		present[cav] = present[cav] || bern(0.45) // a starved pump cavitates
	}
	present[bear] = bern(0.10)
	if present[mis] {
		present[bear] = present[bear] || bern(0.35) // misalignment loads the bearings
	}
	// Severity in [0.2, 1] for a present fault, 0 otherwise.
	var s [4]float64
	for k, p := range present {
		if p {
			s[k] = 0.2 + 0.8*r.Float64()
		}
	}
	n := r.NormFloat64
	load := 0.55 + 0.45*r.Float64()
	f[0] = load
	f[1] = 120*load*(1-0.3*s[clog]) + 3*n()
	f[2] = 150 - 40*load*load - 45*s[clog] - 15*s[cav] + 6*n()
	f[3] = 600 - 150*(load-0.8) - 70*s[cav] + 30*s[clog] + 15*n()
	f[4] = 40*load*(1-0.15*s[clog]) + 4*s[mis] + 1.5*n()
	f[5] = 2 + 1.5*load + 2.2*s[cav] + 1.6*s[bear] + 1.8*s[mis] + 0.5*n()
	f[6] = 1.2 + 0.8*load + 0.6*s[mis] + 0.3*s[clog] + 0.3*n()
	f[7] = 0.4 + 1.6*s[mis] + 0.25*n()
	f[8] = 0.8 + 1.4*s[mis] + 0.3*s[bear] + 0.3*n()
	f[9] = 0.3 + 1.1*s[bear] + 0.5*s[cav] + 0.15*n()
	f[10] = 55 + 10*load + 12*s[bear] + 4*s[mis] + 3*n()
	f[11] = 78 + 4*load + 6*s[cav] + 2*s[bear] + 2*n()
	for j := 5; j <= 9; j++ {
		f[j] = math.Max(f[j], 0.01) // vibration amplitudes are not negative
	}
	return present
}

// write draws n readings and writes them as CSV with a header row and the
// tags, separated by '|', in the last column (empty for a healthy pump).
func write(w io.Writer, n int, seed uint64) error {
	r := rand.New(rand.NewPCG(seed, 0x70756d700a))
	bw := bufio.NewWriter(w)
	for _, f := range features {
		bw.WriteString(f.name)
		bw.WriteByte(',')
	}
	bw.WriteString("tags\n")
	f := make([]float64, len(features))
	var buf []byte
	var cell []string
	for i := 0; i < n; i++ {
		present := draw(r, f)
		for _, v := range f {
			buf = strconv.AppendFloat(buf[:0], v, 'g', 4, 64)
			bw.Write(buf)
			bw.WriteByte(',')
		}
		cell = cell[:0]
		for k, p := range present {
			if p {
				cell = append(cell, tags[k])
			}
		}
		bw.WriteString(strings.Join(cell, "|"))
		bw.WriteByte('\n')
	}
	return bw.Flush()
}
