// Command gen writes the synthetic rare-class data set: sign-ins to the
// accounts of an online service, each labelled as the account holder's
// own ("legit") or an account takeover by someone else ("takeover"), about
// 3% of rows.
//
// THE DATA IS SYNTHETIC. Every row is drawn from distributions written in
// this file; no real sign-in was observed, and the figures say nothing
// about any real service. Takeovers overlap the account holders on
// purpose (careful attackers use a fresh device near the victim and type
// like a person), so no classifier can be right on every row.
//
// Usage:
//
//	go run ./examples/rare/gen [-rows 6000] [-seed 20261203] [-out examples/rare/signins.csv]
//
// The same seed and row count always give the same file.
package main

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"strconv"

	"github.com/seine-ml/seine/examples/internal/synth"
)

// takeoverShare is the share of rows that are takeovers.
const takeoverShare = 0.03

// channels are the levels of the category column channel: the client the
// sign-in came from. missingChannel is the share of rows whose client did
// not report it (an empty cell).
var channels = []string{"web", "ios", "android", "api"}

const missingChannel = 0.04

// header lists the columns in file order.
var header = []string{"failed_logins_1h", "new_device", "distance_km", "account_age_days", "hour_shift", "typing_ms", "channel", "outcome"}

func logn(r *rand.Rand, mu, sigma float64) float64 { return math.Exp(mu + sigma*r.NormFloat64()) }

func bern(r *rand.Rand, p float64) float64 {
	if r.Float64() < p {
		return 1
	}
	return 0
}

// pick draws an index with the given shares (summing to 1).
func pick(r *rand.Rand, shares []float64) int {
	u := r.Float64()
	for i, s := range shares {
		if u < s {
			return i
		}
		u -= s
	}
	return len(shares) - 1
}

// row is one sign-in.
type row struct {
	failed, newDevice, distance, age, hourShift, typing float64 // typing NaN: not measured
	channel                                             int     // index in channels; −1: not reported
	takeover                                            bool
}

// draw draws one sign-in. A takeover draws a "care" s in [0, 1] and moves
// its features from the obvious (many failed attempts, a new device far
// away, pasted passwords) towards the account holder's habits.
func draw(r *rand.Rand) row {
	var w row
	w.takeover = r.Float64() < takeoverShare
	if !w.takeover {
		w.failed = synth.Poisson(r, 0.2)
		w.newDevice = bern(r, 0.07)
		w.distance = logn(r, 1.6, 1.3) // km from the account's usual places; travellers make a long tail
		w.age = math.Round(logn(r, 6.2, 1.0))
		w.hourShift = math.Min(12, math.Abs(2.5*r.NormFloat64()))
		w.typing = logn(r, 5.1, 0.3) // ms between keystrokes in the password field
		w.channel = pick(r, []float64{0.45, 0.25, 0.27, 0.03})
	} else {
		s := math.Sqrt(r.Float64()) // most attackers are careful
		mix := func(obvious, careful float64) float64 { return (1-s)*obvious + s*careful }
		w.failed = synth.Poisson(r, mix(5, 0.3))
		w.newDevice = bern(r, mix(0.9, 0.2))
		w.distance = logn(r, mix(7, 2.0), 1.3)
		w.age = math.Round(logn(r, 6.6, 0.9)) // older accounts hold more worth taking
		w.hourShift = math.Min(12, math.Abs(mix(6, 2.8)*r.NormFloat64()))
		w.typing = logn(r, mix(3.6, 5.0), 0.35) // pasted or scripted passwords come fast
		w.channel = pick(r, []float64{0.5, 0.15, 0.2, 0.15})
	}
	w.age = math.Min(9000, math.Max(1, w.age)) // accounts are 1 day to about 25 years old
	if channels[w.channel] == "api" {
		w.typing = math.NaN() // no keyboard to time
	}
	if r.Float64() < missingChannel {
		w.channel = -1
	}
	return w
}

func write(out io.Writer, rows int, seed uint64) error {
	r := rand.New(rand.NewPCG(seed, 0x5167))
	bw := bufio.NewWriter(out)
	for i, h := range header {
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString(h)
	}
	bw.WriteByte('\n')
	num := func(v float64, prec int) string {
		if math.IsNaN(v) {
			return ""
		}
		return strconv.FormatFloat(v, 'f', prec, 64)
	}
	for range rows {
		w := draw(r)
		ch, outcome := "", "legit"
		if w.channel >= 0 {
			ch = channels[w.channel]
		}
		if w.takeover {
			outcome = "takeover"
		}
		fmt.Fprintf(bw, "%s,%s,%s,%s,%s,%s,%s,%s\n", num(w.failed, 0), num(w.newDevice, 0), num(w.distance, 1), num(w.age, 0),
			num(w.hourShift, 1), num(w.typing, 0), ch, outcome)
	}
	return bw.Flush()
}

func main() {
	synth.Main("rows", 6000, 20261203, "examples/rare/signins.csv", write)
}
