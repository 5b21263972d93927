//go:build !race

package nn

// raceEnabled is true under -race; see race_on_test.go.
const raceEnabled = false
