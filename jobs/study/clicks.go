package study

import "dampfront/model"

// Adjusting is what a spec's adjusters say of a setup: the click of
// each adjuster per corner and where the dampers lie outside the band.
// It is worked out from the spec alone, without compiling, whenever a
// solution is shown (the stored details of a front do not hold it, so
// that a front stored before it keeps its bytes).
type Adjusting struct {
	// Clicks is the click of each adjuster per corner; nil without
	// adjusters.
	Clicks []model.CornerClicks
	// OutOfBand is, per corner and direction outside the adjuster range
	// (Spec.Band), its worst point (model.OutOfBand at
	// model.BandVelocities); nil when inside or without a band.
	OutOfBand []model.BandExcess
}

// Band returns the adjusters a setup is checked against (the
// out-of-band check): the spec's adjusters when given, else its
// adjustment band as two-click adjusters (model.AdjustersOf); nil when
// the spec gives neither.
func (s *Spec) Band() *model.Adjusters {
	if s.Adjusters.Given() {
		return &s.Adjusters
	}
	a := model.AdjustersOf(s.Adjustment)
	if !a.Given() {
		return nil
	}
	return &a
}

// Adjusting works out the clicks of setup su and where it lies outside
// the band. The spec must be checked; a setup the model refuses is a
// *model.ValidationError.
func (s *Spec) Adjusting(su model.Setup) (Adjusting, error) {
	var out Adjusting
	if s.Adjusters.Given() {
		c := s.Adjusters.Clicks(&s.Vehicle, &su)
		out.Clicks = c[:]
	}
	band := s.Band()
	if band == nil {
		return out, nil
	}
	var err error
	out.OutOfBand, err = model.OutOfBand(&s.Vehicle, &su, band, model.BandVelocities)
	return out, err
}

// Warnings words each out-of-band excess as a warning.
func (a Adjusting) Warnings() []string {
	var out []string
	for _, e := range a.OutOfBand {
		out = append(out, "outside the adjuster range: "+e.String())
	}
	return out
}
