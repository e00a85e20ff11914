// Package plot draws the charts an engineer looks at instead of a table:
// a job's Pareto front, the damper force-velocity curves at the
// component, the road input spectra with the ISO 8608 classes, the output
// spectra of a setup with its modes, and the hypervolume of a job per
// generation.
//
// The inputs are the API's protobuf messages (dampfront/v1), whose values
// are SI, and, for road and output spectra, the model's RoadCase, Spectra
// and Mode. Each chart is built as a Figure, which writes itself as SVG or
// PNG to an io.Writer. The axes show trade units, converted from SI by
// the one trade-unit table of package model/tradeunit (the command line's
// and the job page's as well); road and tyre-load PSDs and frequencies
// stay SI (m³, as ISO 8608 gives it; N²/Hz; Hz), ride-height PSDs are in
// mm²/Hz.
//
// Every figure carries the caution of Caution in its footnote: the model
// behind these charts is linear, with statistical linearisation of the
// dampers, tyres as springs and no kinematics.
package plot

import "dampfront/model"

// Caution is the footnote of every figure.
const Caution = model.CautionShort
