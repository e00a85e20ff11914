package jobs

import (
	"encoding/binary"
	"fmt"
	"math"
	"time"
)

// encodeFloats stores a float64 slice bit for bit: 8 bytes per value,
// little-endian IEEE 754 binary64, so NaN payloads, signed zeros and every
// last bit come back unchanged (a decimal or REAL column would not promise
// that for every value).
func encodeFloats(x []float64) []byte {
	b := make([]byte, 8*len(x))
	for i, v := range x {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
	}
	return b
}

// decodeFloats is the inverse of encodeFloats; nil or empty input gives nil.
func decodeFloats(b []byte) ([]float64, error) {
	if len(b)%8 != 0 {
		return nil, fmt.Errorf("jobs: stored float vector has %d bytes, not a multiple of 8", len(b))
	}
	if len(b) == 0 {
		return nil, nil
	}
	x := make([]float64, len(b)/8)
	for i := range x {
		x[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return x, nil
}

// Times are stored as int64 nanoseconds since the Unix epoch, UTC, with 0
// for "not set"; both backends hold that exactly.
func timeToDB(t time.Time) int64 {
	if t.IsZero() {
		return 0
	}
	return t.UnixNano()
}

func timeFromDB(ns int64) time.Time {
	if ns == 0 {
		return time.Time{}
	}
	return time.Unix(0, ns).UTC()
}

func boolToDB(b bool) int64 {
	if b {
		return 1
	}
	return 0
}
