// Package model is the linear four-post ride model of a race car: vehicle
// description, road-input spectra, frequency response, statistical
// linearisation of bump/rebound dampers with a knee, ride metrics, modal
// analysis and damper curves.
//
// # Units
//
// Every quantity is SI: m, kg, s, N, rad, Hz for frequencies and
// cycles/m for spatial frequencies. Trade units (N/mm, N s/mm, mm/s, mm)
// appear only at the edges of the program (CLI tables, reports).
//
// # Sign conventions (written once, here)
//
// Corners are indexed FL=0, FR=1, RL=2, RR=3; axles front=0, rear=1.
// The body coordinate system has its origin at the sprung-mass centre of
// gravity, x forward, y to the left, z up.
//
//	state x = [z, θ, φ, zu_FL, zu_FR, zu_RL, zu_RR]
//	z   heave of the sprung CG, up positive (m)
//	θ   pitch, nose up positive (rad): body point at x rises by x·θ
//	φ   roll, left side up positive (rad): body point at y rises by y·φ
//	zu  vertical wheel (unsprung) displacement, up positive (m)
//	w   road elevation under each tyre, up positive (m)
//
// Body displacement above corner i at (x_i, y_i) is z_b,i = z + x_i θ + y_i φ
// with x = +a at the front axle, -b at the rear, y = ±t/2 (minus any lateral
// CG offset). Suspension travel is s_i = zu_i - z_b,i, positive in bump
// (compression). The spring and damper force F_i is positive when it pushes
// body and wheel apart (bump resisted). Dynamic tyre load is
// kt (w - zu) + ct (ẇ - żu), positive when the tyre is loaded more. Ride
// height at an axle is the body's height above the road under that axle,
// positive up; pitch and roll "relative to the road" subtract the road's own
// slope between the tyre contacts.
//
// The equations of motion are
//
//	M ẍ + C ẋ + K x = Bk w + Bc ẇ
//
// and at angular frequency ω the 7x4 transfer matrix solves
//
//	(K - ω² M + iω C) H(ω) = Bk + iω Bc.
//
// # The car at speed
//
// States are displacements from the car at rest on a flat road (gravity
// balanced by the static loads). At each case's speed the downforce
// presses the car down to its operating point (see OperatingPoint): the
// dynamic model is linearised about it, and the bump-stop gap, the tyre
// load and every probability are taken from it.
//
// # Motion ratios (common practice, no single source)
//
// The motion ratio MR is damper (or spring) travel per wheel travel. A
// spring of rate k gives the wheel rate k·MR², a damper of slope c gives
// c·MR² at the wheel, and damper velocity is MR times wheel velocity; so
// a damper force F_d acts at the wheel as F_d·MR.
//
// # Damping ratio
//
// Per corner the critical damping at the wheel is c_crit = 2 sqrt(k_w m_s),
// with k_w the wheel rate and m_s the sprung corner mass; the tyre is
// ignored (common practice, no single source). The bump and rebound
// low-speed slopes at the wheel are ζ_bump·c_crit and ζ_rebound·c_crit.
package model
