package model

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// FuzzReadProfile feeds arbitrary bytes and options to ReadProfile. The
// property, from the reader's doc comment: any input gives either a
// *ProfileError with a reason, or a usable record — at least
// minProfileSamples finite samples per track, tracks of equal length, a
// finite positive spacing, one header name per column — and a usable
// record survives a round trip through WriteProfile and ReadProfile with
// its shape. Never a panic.
//
// The seed corpus is testdata/fuzz/FuzzReadProfile: valid two- and
// one-track records (an invented smooth road, uniform and jittered
// spacing, comments, a BOM) and broken ones (no header, a NaN, a
// repeated distance, ragged rows, too few samples, bad options).
//
//	go test -run '^$' -fuzz '^FuzzReadProfile$' -fuzztime 60s ./model/
func FuzzReadProfile(f *testing.F) {
	f.Add(fuzzSeedProfile("distance_m,left_m,right_m", 20, 0.05), 0.0, 0.0)
	f.Add(fuzzSeedProfile("\ufeff# one track\ndistance_m,elevation_m", 20, 0.05), 0.0, 0.0)
	f.Add([]byte("distance_m,left_m,right_m\n0,1,2\n"), 0.01, 0.5)
	f.Fuzz(func(t *testing.T, data []byte, tol, res float64) {
		opt := ProfileOptions{SpacingTolerance: tol, Resolution: res}
		p, err := ReadProfile(bytes.NewReader(data), opt)
		if err != nil {
			var pe *ProfileError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v (%T) is not a *ProfileError", err, err)
			}
			if strings.TrimSpace(pe.Reason) == "" {
				t.Fatalf("ProfileError without a reason: %+v", pe)
			}
			return
		}
		checkUsableProfile(t, p)

		// A usable record re-validates: written out exactly and read
		// back, it is again usable, with the same tracks. Its sample
		// count is the same unless writing Start + j·Spacing rounded the
		// distances off uniform and the second read resampled.
		var buf bytes.Buffer
		if err := WriteProfile(&buf, p, -1); err != nil {
			t.Fatalf("WriteProfile of a record ReadProfile accepted: %v", err)
		}
		q, err := ReadProfile(&buf, ProfileOptions{SpacingTolerance: opt.SpacingTolerance})
		if err != nil {
			t.Fatalf("the written record does not read back: %v\nrecord: start %g, spacing %g, %d samples", err, p.Start, p.Spacing, p.Len())
		}
		checkUsableProfile(t, q)
		if (q.Right == nil) != (p.Right == nil) {
			t.Fatalf("read back with right track %v, wrote %v", q.Right != nil, p.Right != nil)
		}
		if !resampled(q) && q.Len() != p.Len() {
			t.Fatalf("read back %d samples without resampling, wrote %d", q.Len(), p.Len())
		}
	})
}

// fuzzSeedProfile is an invented smooth record of n samples dx apart
// under header, with one or two elevation columns as the header has.
func fuzzSeedProfile(header string, n int, dx float64) []byte {
	var b strings.Builder
	b.WriteString(header + "\n")
	two := strings.Count(header, ",") == 2
	for j := range n {
		x := float64(j) * dx
		if two {
			fmt.Fprintf(&b, "%g,%.6g,%.6g\n", x, 1e-3*math.Sin(x), -1e-3*math.Cos(x))
		} else {
			fmt.Fprintf(&b, "%g,%.6g\n", x, 1e-3*math.Sin(x))
		}
	}
	return []byte(b.String())
}

// checkUsableProfile fails t unless p is a record the spectral estimate
// can work on.
func checkUsableProfile(t *testing.T, p *Profile) {
	t.Helper()
	if p.Len() < minProfileSamples {
		t.Fatalf("accepted %d samples, fewer than %d", p.Len(), minProfileSamples)
	}
	if p.Right != nil && len(p.Right) != len(p.Left) {
		t.Fatalf("accepted %d left and %d right samples", len(p.Left), len(p.Right))
	}
	if !(p.Spacing > 0) || math.IsInf(p.Spacing, 0) {
		t.Fatalf("accepted spacing %g m; want finite and > 0", p.Spacing)
	}
	if math.IsNaN(p.Start) || math.IsInf(p.Start, 0) || math.IsInf(p.Length(), 0) {
		t.Fatalf("accepted start %g m, length %g m; want finite", p.Start, p.Length())
	}
	for name, track := range map[string][]float64{"left": p.Left, "right": p.Right} {
		for j, z := range track {
			if math.IsNaN(z) || math.IsInf(z, 0) {
				t.Fatalf("accepted %s sample %d = %g", name, j, z)
			}
		}
	}
	want := 2
	if p.Right != nil {
		want = 3
	}
	if len(p.Names) != want {
		t.Fatalf("accepted %d header names for %d columns", len(p.Names), want)
	}
}

// resampled reports whether ReadProfile resampled p.
func resampled(p *Profile) bool {
	for _, w := range p.Warnings {
		if strings.Contains(w, "resampled") {
			return true
		}
	}
	return false
}
