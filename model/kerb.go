package model

import (
	"math"
)

// KerbShape names a kerb's profile along the road.
type KerbShape int

// The kerb shapes, of height H over length ℓ along the road from its
// start (x = 0):
const (
	KerbHalfSine  KerbShape = iota + 1 // H sin(π x/ℓ)
	KerbTrapezoid                      // up over Ramp, flat at H, down over Ramp
	KerbRampStep                       // H x/ℓ, then a step back down at x = ℓ
)

var kerbShapeNames = map[KerbShape]string{KerbHalfSine: "half_sine", KerbTrapezoid: "trapezoid", KerbRampStep: "ramp_step"}

func (s KerbShape) String() string { return enumName(kerbShapeNames, s, "kerb_shape") }

// KerbSide says which track runs over the kerb.
type KerbSide int

// The sides.
const (
	KerbLeft KerbSide = iota + 1
	KerbRight
	KerbBoth
)

var kerbSideNames = map[KerbSide]string{KerbLeft: "left", KerbRight: "right", KerbBoth: "both"}

func (s KerbSide) String() string { return enumName(kerbSideNames, s, "kerb_side") }

// Kerb is a kerb case: a discrete kerb or bump under one or both tracks,
// run over at a constant speed from the car's operating point; the rear
// tyres meet it wheelbase/V after the front.
type Kerb struct {
	Name   string
	Shape  KerbShape
	Side   KerbSide
	Height float64 // (m)
	Length float64 // along the road (m)
	// Ramp is the trapezoid's ramp length (m); 0 means Length/4.
	Ramp  float64
	Speed float64 // (m/s)
	// Start is when the front tyres meet the kerb (s); 0 means 0.1 s.
	Start float64
	// Duration is the simulated time (s); 0 means until 1 s after the
	// rear tyres leave the kerb.
	Duration float64
	// Road, when not nil, is a road case whose random profile (with its
	// own coherence) lies under the kerb, synthesised with Seed.
	Road *RoadCase
	Seed uint64
	// Weight is the case's weight in the objectives (0 = 1).
	Weight float64
}

const (
	kerbStartDefault = 0.1 // s
	kerbTail         = 1.0 // s after the rear leaves the kerb: ride modes at ζ ≈ 0.3 decay to ~5 %
)

func (k *Kerb) start() float64 {
	if k.Start > 0 {
		return k.Start
	}
	return kerbStartDefault
}

func (k *Kerb) duration(wheelbase float64) float64 {
	if k.Duration > 0 {
		return k.Duration
	}
	return k.start() + (k.Length+wheelbase)/k.Speed + kerbTail
}

func (k *Kerb) weight() float64 {
	if k.Weight == 0 {
		return 1
	}
	return k.Weight
}

func (k *Kerb) ramp() float64 {
	if k.Ramp > 0 {
		return k.Ramp
	}
	return k.Length / 4
}

// profile returns the kerb's height (m) and slope dz/dx (-) at distance
// x (m) from its start.
func (k *Kerb) profile(x float64) (z, dz float64) {
	if x < 0 || x >= k.Length {
		return 0, 0
	}
	h, l := k.Height, k.Length
	switch k.Shape {
	case KerbHalfSine:
		return h * math.Sin(math.Pi*x/l), h * math.Pi / l * math.Cos(math.Pi*x/l)
	case KerbTrapezoid:
		r := k.ramp()
		switch {
		case x < r:
			return h * x / r, h / r
		case x > l-r:
			return h * (l - x) / r, -h / r
		}
		return h, 0
	case KerbRampStep:
		return h * x / l, h / l
	}
	return 0, 0
}

// onTrack reports whether the kerb lies under the left (0) or right (1)
// track.
func (k *Kerb) onTrack(side int) bool {
	return k.Side == KerbBoth || (side == 0 && k.Side == KerbLeft) || (side == 1 && k.Side == KerbRight)
}

// Validate checks the case and names every bad field.
func (k *Kerb) Validate() error {
	var p problems
	p.text("name", k.Name)
	if _, ok := kerbShapeNames[k.Shape]; !ok {
		p.add("shape", "unknown kerb shape %d: use half_sine, trapezoid or ramp_step", int(k.Shape))
	}
	if _, ok := kerbSideNames[k.Side]; !ok {
		p.add("side", "unknown side %d: use left, right or both", int(k.Side))
	}
	p.in("height_m", k.Height, "Kerb.height_m")
	p.in("length_m", k.Length, "Kerb.length_m")
	p.in("speed_m_per_s", k.Speed, "RoadCase.speed_m_per_s")
	p.in("start_s", k.Start, "Manoeuvre.time_s")
	p.in("duration_s", k.Duration, "Manoeuvre.time_s")
	p.in("weight", k.Weight, "RoadCase.weight")
	if k.Ramp != 0 {
		p.in("ramp_m", k.Ramp, "Kerb.length_m")
		if k.Shape != KerbTrapezoid {
			p.add("ramp_m", "is for the trapezoid only, got %s on %s", num(k.Ramp), k.Shape)
		} else if k.Ramp > k.Length/2 {
			p.add("ramp_m", "must be at most half the length (%g m), got %s", k.Length/2, num(k.Ramp))
		}
	}
	if k.Road != nil {
		p.merge("road.", k.Road.Validate())
	}
	return p.err()
}
