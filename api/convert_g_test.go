package api

import (
	"errors"
	"strings"
	"testing"

	"dampfront/model"
)

// A manoeuvre's accelerations are given in g, so an out-of-range one is
// refused in g, the range as the proto comment states it ([0, 8] g and
// [-8, 8] g) and the value as written; the numbers are the spec's own.
func TestAccelerationErrorsQuoteG(t *testing.T) {
	t.Parallel()
	spec := readDemoJob(t, "demo-manoeuvre-job.yaml")
	spec.Manoeuvres[1].LateralG = -10
	spec.Manoeuvres[0].LongitudinalG = -1.5
	_, err := SpecToModel(spec)
	var ve *model.ValidationError
	if !errors.As(err, &ve) {
		t.Fatalf("error %v, want a *model.ValidationError", err)
	}
	want := map[string]string{
		"spec.manoeuvres[1].lateral_g":      "must be in [-8, 8] g, got -10",
		"spec.manoeuvres[0].longitudinal_g": "got -1.5",
	}
	for _, q := range ve.Problems {
		if w, ok := want[q.Field]; ok {
			if !strings.Contains(q.Reason, w) || strings.Contains(q.Reason, "m/s") {
				t.Errorf("%s: %q, want it to say %q and no m/s²", q.Field, q.Reason, w)
			}
			delete(want, q.Field)
		}
	}
	for f := range want {
		t.Errorf("no problem at %s in %v", f, err)
	}
}
