package study

import "dampfront/model"

// Band returns the adjusters a solution is checked against (the
// out-of-band check): the spec's adjusters when given, else its
// adjustment band as two-click adjusters (model.AdjustersOf); nil when
// the spec gives neither.
func (pl *Plan) Band() *model.Adjusters {
	if pl.spec.Adjusters.Given() {
		return &pl.spec.Adjusters
	}
	a := model.AdjustersOf(pl.spec.Adjustment)
	if !a.Given() {
		return nil
	}
	return &a
}

// clicksAndBand adds the clicks of setup s (with adjusters) and where it
// lies outside the band (model.OutOfBand at model.BandVelocities) to
// sol, the latter also as warnings.
func (pl *Plan) clicksAndBand(sol *Solution, s model.Setup) {
	v := pl.eval.Vehicle()
	if pl.spec.Adjusters.Given() {
		c := pl.spec.Adjusters.Clicks(v, &s)
		sol.Clicks = c[:]
	}
	band := pl.Band()
	if band == nil {
		return
	}
	out, err := model.OutOfBand(v, &s, band, model.BandVelocities)
	if err != nil {
		sol.Warnings = append(sol.Warnings, "adjuster range: "+err.Error())
		return
	}
	sol.OutOfBand = out
	for _, e := range out {
		sol.Warnings = append(sol.Warnings, "outside the adjuster range: "+e.String())
	}
}
