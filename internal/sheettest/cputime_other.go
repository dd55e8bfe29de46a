//go:build !unix

package sheettest

import "time"

// CPUTime returns 0 where the process's CPU time is not read; ReportCPU then reports nothing.
func CPUTime() time.Duration { return 0 }
