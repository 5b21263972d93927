//go:build race

package nn

// raceEnabled is true under -race, where sync.Pool drops a share of what is
// put back on purpose, so allocation counts of pooled paths are meaningless.
const raceEnabled = true
