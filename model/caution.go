package model

// Caution is the warning every report of the tool carries: what the model
// leaves out and what its results are for.
const Caution = "Caution: linear model with statistical linearisation, tyres as springs, no kinematics: " +
	"a starting point for rig and track testing by qualified engineers, within the series' technical regulations, " +
	"never a replacement for them."

// CautionShort is Caution for a chart's footnote.
const CautionShort = "Linear model: a starting point for rig and track testing by qualified engineers, within the series' regulations."
