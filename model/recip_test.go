package model

import (
	"math/cmplx"
	"testing"
)

// recip against the runtime's complex division (the reference here), on
// values spread over many orders of magnitude; tolerance a few ulps, the
// two use different but both accurate formulas (Smith 1962, CACM 5(8):435).
func TestRecip(t *testing.T) {
	t.Parallel()
	for _, z := range []complex128{1, 1i, -2 + 3i, 1e-150 + 2e-150i, 3e150 - 1e150i, 5e-3 + 7e8i, -4e8 + 1e-3i} {
		got, want := recip(z), 1/z
		if cmplx.Abs(got-want) > 4e-16*cmplx.Abs(want) {
			t.Errorf("recip(%v) = %v, want %v", z, got, want)
		}
	}
}
