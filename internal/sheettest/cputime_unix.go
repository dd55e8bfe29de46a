//go:build unix

package sheettest

import (
	"syscall"
	"time"
)

// CPUTime returns the CPU time the process has used so far (user and system, every thread:
// the garbage collector's workers too). On a shared machine it varies less than the time
// on the clock, so the benchmarks report it beside ns/op.
func CPUTime() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
