package main

import (
	"bytes"
	"os"
	"strings"
	"testing"
)

// TestCommitted: the committed signins.csv is what the generator writes
// with its default row count and seed, so the data and the code that made
// it cannot drift apart.
func TestCommitted(t *testing.T) {
	var b bytes.Buffer
	if err := write(&b, 6000, 20261203); err != nil {
		t.Fatal(err)
	}
	want, err := os.ReadFile("../signins.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b.Bytes(), want) {
		t.Fatal("examples/rare/signins.csv differs from `go run ./examples/rare/gen`; regenerate it")
	}
}

// TestShares: the file has the rare class at about takeoverShare and the
// gaps the README promises. With 6000 rows the binomial SD of the takeover
// count is √(6000·0.03·0.97) ≈ 13; the bounds are over 3 SD wide.
func TestShares(t *testing.T) {
	var b bytes.Buffer
	if err := write(&b, 6000, 20261203); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")[1:]
	takeovers, noChannel, noTyping := 0, 0, 0
	for _, l := range lines {
		f := strings.Split(l, ",")
		if len(f) != len(header) {
			t.Fatalf("line %q has %d fields, want %d", l, len(f), len(header))
		}
		if f[7] == "takeover" {
			takeovers++
		}
		if f[6] == "" {
			noChannel++
		}
		if f[5] == "" {
			noTyping++
			if f[6] != "api" && f[6] != "" {
				t.Errorf("typing_ms missing on a %s sign-in", f[6])
			}
		}
	}
	if takeovers < 140 || takeovers > 220 {
		t.Errorf("%d takeovers in 6000 rows, want about 180", takeovers)
	}
	if noChannel < 180 || noChannel > 300 {
		t.Errorf("%d rows without a channel, want about 240", noChannel)
	}
	if noTyping == 0 {
		t.Error("no API sign-in without typing_ms")
	}
}
