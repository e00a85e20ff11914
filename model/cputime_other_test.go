//go:build !unix

package model

import "time"

// processCPU is not measured here; the benchmarks then report ns/op only.
func processCPU() (time.Duration, bool) { return 0, false }
