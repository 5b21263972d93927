// Command gen writes the synthetic triage data set: client sessions of a
// web service, each described by per-session traffic features and labelled
// with the kind of client that produced it.
//
// THE DATA IS SYNTHETIC. Every row is drawn from distributions written in
// this file; no real traffic was observed. The classes overlap on purpose
// (careful bots imitate people, some people behave like bots), so no
// classifier can reach 100% on it.
//
// Usage:
//
//	go run ./examples/triage/gen [-rows 3000] [-seed 20261202] [-out examples/triage/sessions.csv]
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

	"github.com/seine-ml/seine/examples/internal/synth"
)

// features lists the number columns in file order, with what each one
// measures. The category column agent_family (see agentFamilies) follows
// the first.
var features = []struct{ name, meaning string }{
	{"req_per_min", "requests per minute over the session"},
	{"error_share", "share of responses with status 4xx or 5xx"},
	{"distinct_paths", "distinct paths requested per 100 requests"},
	{"asset_share", "share of requests for static assets (images, scripts, styles)"},
	{"login_attempts", "login form submissions in the session"},
	{"login_fail_share", "share of login submissions that failed"},
	{"interval_cv", "coefficient of variation of the gaps between requests (low = clockwork)"},
	{"session_min", "session length in minutes"},
	{"night_share", "share of requests made between 01:00 and 05:00 server time"},
	{"robots_fetched", "1 if the client fetched /robots.txt"},
	{"referer_share", "share of requests carrying a Referer header"},
	{"header_count", "mean number of request headers"},
	{"resp_kb", "mean response size in KiB"},
	{"head_share", "share of HEAD requests"},
	{"path_depth", "mean number of segments in requested paths"},
	{"revisit_share", "share of requests for a path already requested in the session"},
}

// agentFamilies are the levels of the category column agent_family: what
// the client's User-Agent header claims to be.
var agentFamilies = []string{"browser", "mobile-app", "cli", "library"}

// kind is one class of client, with its share of sessions and the shares of
// the agent families it claims (in the order of agentFamilies).
type kind struct {
	name   string
	share  float64
	draw   func(r *rand.Rand, f []float64)
	agents [4]float64
}

// Helpers for the class-conditional distributions.
func logn(r *rand.Rand, mu, sigma float64) float64 { return math.Exp(mu + sigma*r.NormFloat64()) }
func beta(r *rand.Rand, mean, conc float64) float64 {
	// A beta draw from two gamma draws; mean in (0,1), conc = a+b.
	a, b := mean*conc, (1-mean)*conc
	x, y := gamma(r, a), gamma(r, b)
	return x / (x + y)
}

// gamma draws Gamma(shape, 1) by Marsaglia & Tsang (2000), with the usual
// boost for shape < 1.
func gamma(r *rand.Rand, shape float64) float64 {
	if shape < 1 {
		return gamma(r, shape+1) * math.Pow(r.Float64(), 1/shape)
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := r.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		if math.Log(u) < 0.5*x*x+d-d*v+d*math.Log(v) {
			return d * v
		}
	}
}
func bern(r *rand.Rand, p float64) float64 {
	if r.Float64() < p {
		return 1
	}
	return 0
}

var kinds = []kind{
	{"human", 0.52, func(r *rand.Rand, f []float64) {
		f[0] = logn(r, 1.6, 0.6)
		f[1] = beta(r, 0.04, 40)
		f[2] = 100 * beta(r, 0.35, 8)
		f[3] = beta(r, 0.55, 10)
		f[4] = synth.Poisson(r, 0.4)
		f[5] = failShare(r, f[4], 0.2)
		f[6] = logn(r, 0.3, 0.35)
		f[7] = logn(r, 2.0, 0.8)
		f[8] = beta(r, 0.08, 12)
		f[9] = bern(r, 0.01)
		f[10] = beta(r, 0.8, 12)
		f[11] = 11 + r.NormFloat64()*1.5
		f[12] = logn(r, 3.2, 0.6)
		f[13] = beta(r, 0.01, 50)
		f[14] = 2.2 + 0.6*r.NormFloat64()
		f[15] = beta(r, 0.3, 10)
	}, [4]float64{0.85, 0.13, 0.01, 0.01}},
	{"crawler", 0.16, func(r *rand.Rand, f []float64) {
		f[0] = logn(r, 2.6, 0.7)
		f[1] = beta(r, 0.09, 30)
		f[2] = 100 * beta(r, 0.85, 15)
		f[3] = beta(r, 0.08, 15)
		f[4] = 0
		f[5] = 0
		f[6] = logn(r, -0.6, 0.5)
		f[7] = logn(r, 3.0, 0.9)
		f[8] = beta(r, 0.2, 10)
		f[9] = bern(r, 0.85)
		f[10] = beta(r, 0.1, 10)
		f[11] = 6 + r.NormFloat64()*1.5
		f[12] = logn(r, 2.9, 0.6)
		f[13] = beta(r, 0.06, 20)
		f[14] = 3.0 + 0.9*r.NormFloat64()
		f[15] = beta(r, 0.04, 30)
	}, [4]float64{0.30, 0, 0.20, 0.50}},
	{"scraper", 0.14, func(r *rand.Rand, f []float64) {
		// Careful scrapers (sophistication near 1) imitate people.
		s := r.Float64()
		mix := func(bot, person float64) float64 { return (1-s)*bot + s*person }
		f[0] = logn(r, mix(3.0, 1.9), 0.6)
		f[1] = beta(r, mix(0.12, 0.05), 25)
		f[2] = 100 * beta(r, mix(0.7, 0.45), 10)
		f[3] = beta(r, mix(0.05, 0.4), 10)
		f[4] = synth.Poisson(r, 0.1)
		f[5] = failShare(r, f[4], 0.3)
		f[6] = logn(r, mix(-0.8, 0.1), 0.45)
		f[7] = logn(r, 2.6, 0.9)
		f[8] = beta(r, 0.15, 10)
		f[9] = bern(r, 0.15)
		f[10] = beta(r, mix(0.15, 0.7), 10)
		f[11] = mix(7, 10.5) + r.NormFloat64()*1.5
		f[12] = logn(r, 3.6, 0.5)
		f[13] = beta(r, 0.02, 40)
		f[14] = 3.4 + 0.7*r.NormFloat64()
		f[15] = beta(r, 0.1, 15)
	}, [4]float64{0.50, 0, 0.15, 0.35}},
	{"stuffer", 0.08, func(r *rand.Rand, f []float64) {
		f[0] = logn(r, 2.3, 0.8)
		f[1] = beta(r, 0.35, 10)
		f[2] = 100 * beta(r, 0.08, 15)
		f[3] = beta(r, 0.1, 10)
		f[4] = 1 + synth.Poisson(r, 12)
		f[5] = failShare(r, f[4], 0.85)
		f[6] = logn(r, -0.2, 0.6)
		f[7] = logn(r, 1.6, 0.9)
		f[8] = beta(r, 0.25, 8)
		f[9] = bern(r, 0.02)
		f[10] = beta(r, 0.45, 6)
		f[11] = 9 + r.NormFloat64()*2
		f[12] = logn(r, 1.5, 0.5)
		f[13] = beta(r, 0.02, 40)
		f[14] = 1.6 + 0.4*r.NormFloat64()
		f[15] = beta(r, 0.6, 10)
	}, [4]float64{0.15, 0.05, 0.30, 0.50}},
	{"monitor", 0.10, func(r *rand.Rand, f []float64) {
		f[0] = logn(r, 0.2, 0.7)
		f[1] = beta(r, 0.03, 30)
		f[2] = 100 * beta(r, 0.03, 20)
		f[3] = beta(r, 0.03, 20)
		f[4] = synth.Poisson(r, 0.05)
		f[5] = failShare(r, f[4], 0.1)
		f[6] = logn(r, -1.4, 0.6)
		f[7] = logn(r, 4.0, 0.8)
		f[8] = beta(r, 0.17, 30)
		f[9] = bern(r, 0.05)
		f[10] = beta(r, 0.02, 30)
		f[11] = 5 + r.NormFloat64()*1.2
		f[12] = logn(r, 0.8, 0.7)
		f[13] = beta(r, 0.4, 4)
		f[14] = 1.3 + 0.4*r.NormFloat64()
		f[15] = beta(r, 0.95, 30)
	}, [4]float64{0.05, 0, 0.60, 0.35}},
}

// failShare draws the share of failed logins among n attempts.
func failShare(r *rand.Rand, n, p float64) float64 {
	if n == 0 {
		return 0
	}
	fail := 0.0
	for i := 0; i < int(n); i++ {
		fail += bern(r, p)
	}
	return fail / n
}

func main() {
	synth.Main("sessions", 3000, 20261202, filepath.Join("examples", "triage", "sessions.csv"), write)
}

// write draws n sessions and writes them as CSV with a header row and the
// class in the last column. The category column agent_family comes second
// and is drawn from a stream of its own, so that the number columns are the
// same as before it was added; 3% of its cells and 2% of the resp_kb cells
// are left empty (the log lacked them: an assumption of this demo).
func write(w io.Writer, n int, seed uint64) error {
	r := rand.New(rand.NewPCG(seed, 0x7472696167650a))
	ra := rand.New(rand.NewPCG(seed, 0x6167656e74730a))
	bw := bufio.NewWriter(w)
	for j, f := range features {
		bw.WriteString(f.name)
		bw.WriteByte(',')
		if j == 0 {
			bw.WriteString("agent_family,")
		}
	}
	bw.WriteString("kind\n")
	f := make([]float64, len(features))
	var buf []byte
	for i := 0; i < n; i++ {
		u, k := r.Float64(), 0
		for acc := kinds[0].share; u > acc && k < len(kinds)-1; {
			k++
			acc += kinds[k].share
		}
		kinds[k].draw(r, f)
		// 2% of labels are wrong, as hand labels of traffic are (an
		// assumption of this demo, not a measured rate).
		label := kinds[k].name
		if r.Float64() < 0.02 {
			label = kinds[r.IntN(len(kinds))].name
		}
		agent := ""
		if ra.Float64() >= 0.03 {
			u, a := ra.Float64(), 0
			for acc := kinds[k].agents[0]; u > acc && a < len(agentFamilies)-1; {
				a++
				acc += kinds[k].agents[a]
			}
			agent = agentFamilies[a]
		}
		noSize := ra.Float64() < 0.02
		for j, v := range f {
			if j == 11 || j == 14 {
				v = math.Max(v, 1)
			}
			if !(j == 12 && noSize) {
				buf = strconv.AppendFloat(buf[:0], v, 'g', 4, 64)
				bw.Write(buf)
			}
			bw.WriteByte(',')
			if j == 0 {
				bw.WriteString(agent)
				bw.WriteByte(',')
			}
		}
		bw.WriteString(label)
		bw.WriteByte('\n')
	}
	return bw.Flush()
}
