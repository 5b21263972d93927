//go:build unix

package benchmarks

import (
	"syscall"
	"time"
)

// cpuTime returns the user plus system CPU time of the process so far. On a
// shared machine it varies far less with the load than wall time does.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
