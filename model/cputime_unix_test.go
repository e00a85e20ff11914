//go:build unix

package model

import (
	"syscall"
	"time"
)

// processCPU is the user CPU time the process has used so far: on a
// machine shared with other work the benchmarks report it per op beside
// the wall-clock ns/op (run them with -cpu 1 so that it is one core's).
func processCPU() (time.Duration, bool) {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0, false
	}
	return time.Duration(ru.Utime.Nano()), true
}
