// Package plot draws the charts an engineer looks at instead of a table:
// a job's Pareto front, the damper force-velocity curves at the
// component, the road input spectra with the ISO 8608 classes, the output
// spectra of a setup with its modes, and the hypervolume of a job per
// generation.
//
// The inputs are the API's protobuf messages (dampfront/v1), whose values
// are SI, and, for road and output spectra, the model's RoadCase, Spectra
// and Mode. Each chart is built as a Figure, which writes itself as SVG or
// PNG to an io.Writer. The axes show trade units; every conversion from SI
// is in units.go and nowhere else:
//
//	grip (relative tyre load)     -      -> % of static load   x 100
//	platform, ride height         m      -> mm                 x 1000
//	damper velocity, knee         m/s    -> mm/s               x 1000
//	damper slope                  N s/m  -> N s/mm             / 1000
//	angle (pitch, roll)           rad    -> deg                x 180/π
//	heave acceleration            m/s²   -> g                  / 9.80665
//	force                         N      -> N
//	road displacement PSD         m³     -> m³ (ISO 8608's unit)
//	tyre load PSD                 N²/Hz  -> N²/Hz
//	ride-height PSD               m²/Hz  -> mm²/Hz             x 10⁶
//	frequency                     Hz     -> Hz
//
// Every figure carries the caution of Caution in its footnote: the model
// behind these charts is linear, with statistical linearisation of the
// dampers, tyres as springs and no kinematics.
package plot

import "dampfront/model"

// Caution is the footnote of every figure.
const Caution = model.CautionShort
