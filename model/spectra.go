package model

import "fmt"

// Spectra are the one-sided output PSDs of one setup on one road case at
// the grid frequencies, at the linearisation's fixed point.
type Spectra struct {
	Case        string
	FrequencyHz []float64
	TyreLoad    [4][]float64 // dynamic tyre load (N²/Hz)
	Travel      [4][]float64 // suspension travel at the wheel (m²/Hz)
	RideHeight  [2][]float64 // ride height relative to the road, front, rear (m²/Hz)
	Pitch       []float64    // pitch relative to the road (rad²/Hz)
	Roll        []float64    // roll relative to the road (rad²/Hz)
	HeaveAccel  []float64    // heave acceleration ((m/s²)²/Hz)
	RoadLeft    []float64    // temporal road displacement PSD of the left track (m²/Hz)
}

// Spectra returns the output spectra of setup s on road case ci, with the
// case's metrics. It allocates; it is meant for plots and reports.
func (e *Evaluator) Spectra(s Setup, ci int) (*Spectra, *CaseMetrics, error) {
	if ci < 0 || ci >= len(e.cases) {
		return nil, nil, fmt.Errorf("model: road case index %d out of range [0, %d)", ci, len(e.cases))
	}
	if err := s.Validate(); err != nil {
		return nil, nil, err
	}
	if err := e.v.CheckSetup(&s); err != nil {
		return nil, nil, err
	}
	n := len(e.f)
	psd := make([]float64, nOut*n)
	dampers := e.ref.dampers(&s)
	var m CaseMetrics
	ws := e.pool.Get().(*workspace)
	defer e.pool.Put(ws)
	if err := e.evaluateCase(ci, &dampers, ws, &m, psd); err != nil {
		return nil, nil, err
	}
	col := func(o int) []float64 {
		out := make([]float64, n)
		for k := range out {
			out[k] = psd[k*nOut+o]
		}
		return out
	}
	sp := &Spectra{Case: e.cases[ci].rc.Name, FrequencyHz: append([]float64(nil), e.f...),
		Pitch: col(outPitch), Roll: col(outRoll), HeaveAccel: col(outHeaveAcc),
		RideHeight: [2][]float64{col(outRide), col(outRide + 1)}}
	for i := 0; i < 4; i++ {
		sp.TyreLoad[i] = col(outTyre + i)
		sp.Travel[i] = col(outTravel + i)
	}
	rc := &e.cases[ci].rc
	sp.RoadLeft = make([]float64, n)
	for k, f := range e.f {
		l, _ := rc.SpatialPSD(f / rc.Speed)
		sp.RoadLeft[k] = l / rc.Speed
	}
	return sp, &m, nil
}
