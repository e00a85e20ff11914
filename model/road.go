package model

import (
	"fmt"
	"math"
	"sort"
)

// ISO8608N0 is the reference spatial frequency n0 = 0.1 cycles/m of ISO
// 8608:1995 (the angular form uses Ω0 = 1 rad/m; the two are not
// interchangeable: Gd(Ω0) = Gd(n0)/16 for waviness 2, see ISOClassGdOmega0).
const ISO8608N0 = 0.1

// isoClasses holds the ISO 8608:1995 geometric-mean Gd(n0) of each class
// (m³, at n0 = 0.1 cycles/m): 16e-6 m³ for class A, each next class four
// times the previous one (ISO 8608:1995, table on degree of roughness).
var isoClasses = []string{"A", "B", "C", "D", "E", "F", "G", "H"}

// ISOClassGd0 returns the geometric-mean Gd(n0) of an ISO 8608 class
// letter (m³ at n0 = 0.1 cycles/m) and its lower and upper class limits.
// Class A has no lower limit (0 is returned).
func ISOClassGd0(class string) (mean, lower, upper float64, err error) {
	for i, c := range isoClasses {
		if c == class {
			mean = 16e-6 * math.Pow(4, float64(i))
			upper = 2 * mean
			if i > 0 {
				lower = mean / 2
			}
			return mean, lower, upper, nil
		}
	}
	return 0, 0, 0, fmt.Errorf("unknown ISO 8608 class %q (want A to H)", class)
}

// ISOClassGdOmega0 converts a displacement PSD given at n0 = 0.1 cycles/m
// with waviness w to the angular form of ISO 8608 at Ω0 = 1 rad/m:
//
//	Gd(Ω) = Gd(n)/(2π) with Ω = 2πn, so
//	Gd(Ω0) = Gd(n0) (Ω0/(2π n0))^(-w) / (2π).
//
// For w = 2 this is (2π n0)² Gd(n0)/(2π) = Gd(n0)/15.92: the factor of
// about 16 that is often mixed up.
func ISOClassGdOmega0(gdN0, waviness float64) float64 {
	return gdN0 * math.Pow(1/(2*math.Pi*ISO8608N0), -waviness) / (2 * math.Pi)
}

// ClassifyISO returns the ISO 8608 class whose limits contain Gd(n0) (m³).
func ClassifyISO(gdN0 float64) string {
	for _, c := range isoClasses {
		_, _, upper, _ := ISOClassGd0(c)
		if gdN0 < upper {
			return c
		}
	}
	return "H"
}

// CoherenceKind selects how the left and right tracks are related.
type CoherenceKind int

const (
	// CoherenceAuto uses the measured coherence when the spectrum is
	// measured and has one, and the isotropic model otherwise.
	CoherenceAuto CoherenceKind = iota
	// CoherenceIsotropic is the isotropic-surface model of Dodds &
	// Robson (1973), see IsotropicCoherence.
	CoherenceIsotropic
	// CoherenceFull makes left and right identical (γ = 1).
	CoherenceFull
	// CoherenceTable interpolates a user table γ(n).
	CoherenceTable
)

// Coherence describes the normalised real cross-spectrum
// γ(n) = S_LR(n)/sqrt(S_LL(n) S_RR(n)) of the left and right tracks.
type Coherence struct {
	Kind CoherenceKind
	// N and Gamma tabulate γ(n) for CoherenceTable: spatial frequency
	// (cycles/m, increasing) and γ in [-1, 1]; linear in log n between
	// points, held beyond the last point, and rising to 1 below the first
	// (see tableCoherence).
	N, Gamma []float64
}

// MeasuredSpectrum is a spatial displacement PSD estimated from a profile,
// tabulated against spatial frequency and interpolated in log-log.
type MeasuredSpectrum struct {
	N     []float64 // spatial frequency (cycles/m), increasing, > 0
	Left  []float64 // one-sided displacement PSD of the left track (m³ = m²/(cycles/m))
	Right []float64 // the same for the right track; nil means equal to Left
	// Coherence is the measured γ(n) on N; nil when unknown.
	Coherence []float64
}

// RoadCase is one road input: a spatial spectrum driven at a speed.
type RoadCase struct {
	Name   string
	Speed  float64 // m/s
	Weight float64 // relative weight when aggregating over cases; 0 means 1

	// ISO 8608 power law Gd(n) = Gd0 (n/n0)^-w. Class, when set, gives Gd0
	// as the class's geometric mean; otherwise Gd0 is given (m³).
	Class    string
	Gd0      float64 // m³ at n0 = 0.1 cycles/m
	Waviness float64 // w (-); 0 means 2

	// Measured replaces the power law when set.
	Measured *MeasuredSpectrum

	Coherence Coherence
}

func (rc *RoadCase) waviness() float64 {
	if rc.Waviness == 0 {
		return 2
	}
	return rc.Waviness
}

func (rc *RoadCase) weight() float64 {
	if rc.Weight == 0 {
		return 1
	}
	return rc.Weight
}

// gd0 resolves Gd(n0) of the power law.
func (rc *RoadCase) gd0() float64 {
	if rc.Class != "" {
		m, _, _, err := ISOClassGd0(rc.Class)
		if err == nil {
			return m
		}
	}
	return rc.Gd0
}

// Validate checks the road case and names every bad field.
func (rc *RoadCase) Validate() error {
	var p problems
	p.text("name", rc.Name)
	p.in("speed_m_per_s", rc.Speed, "RoadCase.speed_m_per_s")
	p.in("weight", rc.Weight, "RoadCase.weight")
	switch {
	case rc.Measured != nil:
		m := rc.Measured
		if len(m.N) < 2 {
			p.add("measured.n_cycles_per_m", "needs at least 2 points, got %d", len(m.N))
		}
		if len(m.Left) != len(m.N) {
			p.add("measured.left_m3", "needs one value per frequency (%d), got %d", len(m.N), len(m.Left))
		}
		if m.Right != nil && len(m.Right) != len(m.N) {
			p.add("measured.right_m3", "needs one value per frequency (%d), got %d", len(m.N), len(m.Right))
		}
		if m.Coherence != nil && len(m.Coherence) != len(m.N) {
			p.add("measured.coherence", "needs one value per frequency (%d), got %d", len(m.N), len(m.Coherence))
		}
		p.table("measured.n_cycles_per_m", m.N, "RoadCase.n_cycles_per_m", true)
		p.table("measured.left_m3", m.Left, "RoadCase.psd_m3", false)
		p.table("measured.right_m3", m.Right, "RoadCase.psd_m3", false)
		p.table("measured.coherence", m.Coherence, "RoadCase.coherence", false)
	case rc.Class != "":
		if _, _, _, err := ISOClassGd0(rc.Class); err != nil {
			p.add("iso_class", "%v", err)
		}
	default:
		p.in("gd0_m3", rc.Gd0, "RoadCase.gd0_m3")
	}
	p.inOrZero("waviness", rc.Waviness, "RoadCase.waviness")
	switch rc.Coherence.Kind {
	case CoherenceAuto, CoherenceIsotropic, CoherenceFull:
	case CoherenceTable:
		c := rc.Coherence
		if len(c.N) < 1 || len(c.N) != len(c.Gamma) {
			p.add("coherence.n_cycles_per_m", "needs as many points as coherence.gamma and at least one, got %d and %d", len(c.N), len(c.Gamma))
		}
		p.table("coherence.n_cycles_per_m", c.N, "RoadCase.n_cycles_per_m", true)
		p.table("coherence.gamma", c.Gamma, "RoadCase.coherence", false)
	default:
		p.add("coherence.kind", "unknown coherence kind %d", rc.Coherence.Kind)
	}
	return p.err()
}

// SpatialPSD returns the one-sided displacement PSDs of the left and right
// tracks at spatial frequency n (cycles/m), in m³:
//
//	Gd(n) = Gd(n0) (n/n0)^-w   (ISO 8608:1995, eq. for the fitted PSD)
//
// or the measured table interpolated linearly in log n - log Gd and
// extended beyond its ends by a power law fitted to its outer points (see
// tableSpectrum).
func (rc *RoadCase) SpatialPSD(n float64) (left, right float64) {
	if m := rc.Measured; m != nil {
		left = tableSpectrum(m.N, m.Left, n)
		if m.Right == nil {
			return left, left
		}
		return left, tableSpectrum(m.N, m.Right, n)
	}
	g := rc.gd0() * math.Pow(n/ISO8608N0, -rc.waviness())
	return g, g
}

// CoherenceAt returns γ(n) for tracks a distance track (m) apart.
func (rc *RoadCase) CoherenceAt(n, track float64) float64 {
	switch rc.Coherence.Kind {
	case CoherenceFull:
		return 1
	case CoherenceTable:
		return tableCoherence(rc.Coherence.N, rc.Coherence.Gamma, n)
	case CoherenceAuto:
		if rc.Measured != nil && rc.Measured.Coherence != nil {
			return tableCoherence(rc.Measured.N, rc.Measured.Coherence, n)
		}
	}
	return IsotropicCoherence(n, track, rc.waviness())
}

// TemporalPSD converts a spatial one-sided PSD to the temporal one at
// frequency f (Hz) for speed V (m/s): S(f) = Gd(f/V)/V (m²/Hz).
func TemporalPSD(gd func(n float64) float64, f, speed float64) float64 {
	return gd(f/speed) / speed
}

// IsotropicCoherence is the coherence of two parallel tracks a distance B
// apart on an isotropic surface whose track PSD is ∝ n^-w (Dodds &
// Robson 1973, J. Sound Vib. 31(2):175-183). The isotropic 2-D spectrum
// is then ∝ |k|^-(w+1), and the ratio of the cross-spectrum to the track
// spectrum is, with ν = w/2 and x = 2π n B,
//
//	γ(n) = 2^(1-ν)/Γ(ν) · x^ν K_ν(x)
//
// (integral 3.771.2 of Gradshteyn & Ryzhik). For w = 2 this is x K_1(x);
// for w = 1 it is exp(-x). K_ν is the modified Bessel function of the
// second kind, computed here from K_ν(x) = ∫_0^∞ exp(-x cosh t) cosh(νt) dt.
func IsotropicCoherence(n, track, waviness float64) float64 {
	x := 2 * math.Pi * n * track
	if x < 1e-9 {
		return 1
	}
	nu := waviness / 2
	lg, _ := math.Lgamma(nu)
	// log of 2^(1-ν)/Γ(ν) x^ν, combined with K_ν to avoid overflow.
	logPre := (1-nu)*math.Ln2 - lg + nu*math.Log(x)
	return besselKScaled(nu, x, logPre)
}

// besselKScaled returns exp(logPre) K_ν(x) by the trapezoid rule on
// K_ν(x) = ∫_0^∞ exp(-x cosh t) cosh(νt) dt; the integrand is smooth and
// decays doubly exponentially, so the rule converges geometrically.
func besselKScaled(nu, x, logPre float64) float64 {
	// Upper limit where x cosh t - ν t exceeds 40 + logPre margins.
	tMax := math.Acosh(math.Max(1, (60+math.Abs(logPre))/x)) + 1
	const steps = 400
	h := tMax / steps
	sum := 0.0
	for k := 0; k <= steps; k++ {
		t := float64(k) * h
		e := logPre - x*math.Cosh(t)
		v := 0.5 * (math.Exp(e+nu*t) + math.Exp(e-nu*t))
		if k == 0 || k == steps {
			v /= 2
		}
		sum += v
	}
	return sum * h
}

// logLogInterp interpolates y(x) linearly in log x - log y, extending
// beyond the ends with the end segments' slopes.
func logLogInterp(xs, ys []float64, x float64) float64 {
	i := segment(xs, x)
	lx0, lx1 := math.Log(xs[i]), math.Log(xs[i+1])
	ly0, ly1 := math.Log(ys[i]), math.Log(ys[i+1])
	t := (math.Log(x) - lx0) / (lx1 - lx0)
	return math.Exp(ly0 + t*(ly1-ly0))
}

// logLinInterp interpolates y(x) linearly in log x, holding the end values
// beyond the ends.
func logLinInterp(xs, ys []float64, x float64) float64 {
	if len(xs) == 1 || x <= xs[0] {
		return ys[0]
	}
	if x >= xs[len(xs)-1] {
		return ys[len(ys)-1]
	}
	i := segment(xs, x)
	t := (math.Log(x) - math.Log(xs[i])) / (math.Log(xs[i+1]) - math.Log(xs[i]))
	return ys[i] + t*(ys[i+1]-ys[i])
}

// segment returns i with xs[i] <= x < xs[i+1], clamped to [0, len-2].
func segment(xs []float64, x float64) int {
	i := sort.SearchFloat64s(xs, x) - 1
	if i < 0 {
		i = 0
	}
	if i > len(xs)-2 {
		i = len(xs) - 2
	}
	return i
}

// tableSpectrum interpolates a tabulated PSD linearly in log n - log G
// and extends it beyond each end by G ∝ n^-w, with w fitted by least
// squares in log-log to the outer points (up to 5 or a third of the
// table) and held within [1, 4], the range of road wavinesses (ISO 8608
// uses 2; measured roads lie roughly between 1.5 and 3.5). A raw end
// segment of a Welch estimate is too noisy to extrapolate by itself, and
// a slope outside that range would make the tails of the output spectra
// diverge.
func tableSpectrum(ns, gs []float64, n float64) float64 {
	last := len(ns) - 1
	switch {
	case n < ns[0]:
		return gs[0] * math.Pow(n/ns[0], -endWaviness(ns, gs, false))
	case n > ns[last]:
		return gs[last] * math.Pow(n/ns[last], -endWaviness(ns, gs, true))
	}
	return logLogInterp(ns, gs, n)
}

// endWaviness fits the exponent w of G ∝ n^-w to the outer points at the
// top (or bottom) of a table, clamped to [1, 4].
func endWaviness(ns, gs []float64, top bool) float64 {
	k := len(ns) / 3
	if k > 5 {
		k = 5
	}
	if k < 2 {
		k = 2
	}
	lo := 0
	if top {
		lo = len(ns) - k
	}
	var sx, sy, sxx, sxy float64
	for i := lo; i < lo+k; i++ {
		x, y := math.Log(ns[i]), math.Log(gs[i])
		sx, sy, sxx, sxy = sx+x, sy+y, sxx+x*x, sxy+x*y
	}
	fk := float64(k)
	w := -(fk*sxy - sx*sy) / (fk*sxx - sx*sx)
	if !(w >= 1) {
		w = 1
	}
	if w > 4 {
		w = 4
	}
	return w
}

// tableCoherence interpolates a coherence table linearly in log n, holds
// its last value beyond the top, and below the first point n0 rises to
// full coherence as γ(n) = 1 - (1 - γ0)(n/n0)²: at wavelengths much
// longer than the track width both tracks see the same road, as every
// coherence model does (Dodds & Robson 1973: γ -> 1 as n B -> 0), and a
// coherence held below 1 down to n = 0 would give the road an unbounded
// twist.
func tableCoherence(ns, gam []float64, n float64) float64 {
	if n < ns[0] {
		r := n / ns[0]
		return 1 - (1-gam[0])*r*r
	}
	return logLinInterp(ns, gam, n)
}
