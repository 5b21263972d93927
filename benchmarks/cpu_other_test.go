//go:build !unix

package benchmarks

import "time"

// cpuTime is 0 where getrusage is not available; the cpu- metrics are then 0.
func cpuTime() time.Duration { return 0 }
