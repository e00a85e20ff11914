package model

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// linearAdjusters are nine-click low-speed adjusters from 1.2 (click 0)
// to 0.4 (click 8) in both directions and five-click high-speed ones
// from 0.9 to 0.3, on both axles.
func linearAdjusters() Adjusters {
	d := DamperAdjusters{
		LowBump:     Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4},
		LowRebound:  Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4},
		HighBump:    Adjuster{Clicks: 5, Stiffest: 0.9, Softest: 0.3},
		HighRebound: Adjuster{Clicks: 5, Stiffest: 0.9, Softest: 0.3},
	}
	return Adjusters{Axles: [2]DamperAdjusters{d, d}}
}

// TestClicksAndSnap: the nearest click of the linear map, worked by
// hand: a click step of (1.2 - 0.4)/8 = 0.1 in ratio and (0.9 - 0.3)/4 =
// 0.15 in factor; snapping puts each value on its click's setting and is
// idempotent.
func TestClicksAndSnap(t *testing.T) {
	t.Parallel()
	v := demoCar()
	adj := linearAdjusters()
	if err := adj.Validate(); err != nil {
		t.Fatal(err)
	}
	s := Setup{Axles: [2]AxleDamping{
		{BumpRatio: 0.87, ReboundRatio: 0.41, KneeBump: 0.05, KneeRebound: 0.05, HighSpeedBump: 0.5, HighSpeedRebound: 0.8},
		{BumpRatio: 1.5, ReboundRatio: 0.2, KneeBump: 0.05, KneeRebound: 0.05, HighSpeedBump: 0.36, HighSpeedRebound: 0},
	}}
	// By hand: 0.87 -> (1.2-0.87)/0.1 = 3.3 -> 3 (0.9); 0.41 -> 7.9 -> 8
	// (0.4); factor 0.5 -> (0.9-0.5)/0.15 = 2.67 -> 3 (0.45); 0.8 -> 0.67
	// -> 1 (0.75); 1.5 and 0.2 outside: clamped to 0 and 8; 0.36 -> 3.6 ->
	// 4 (0.3); factor 0 means 1 -> -0.67 -> 0 (0.9).
	want := [2]CornerClicks{{LowBump: 3, LowRebound: 8, HighBump: 3, HighRebound: 1}, {LowBump: 0, LowRebound: 8, HighBump: 4, HighRebound: 0}}
	got := adj.Clicks(&v, &s)
	for i, c := range got {
		w := want[i/2]
		w.Corner = i
		if c != w {
			t.Errorf("corner %d: clicks %+v, want %+v", i, c, w)
		}
	}
	if g := got[0].String(); g != "FL: LS bump 3, LS rebound 8, HS bump 3, HS rebound 1" {
		t.Errorf("String %q", g)
	}
	sn := adj.Snap(&v, s)
	const tol = 1e-12 // rounding of stiffest + step·k
	for _, c := range []struct{ got, want float64 }{
		{sn.Axles[0].BumpRatio, 0.9}, {sn.Axles[0].ReboundRatio, 0.4}, {sn.Axles[0].HighSpeedBump, 0.45}, {sn.Axles[0].HighSpeedRebound, 0.75},
		{sn.Axles[1].BumpRatio, 1.2}, {sn.Axles[1].ReboundRatio, 0.4}, {sn.Axles[1].HighSpeedBump, 0.3}, {sn.Axles[1].HighSpeedRebound, 0.9},
	} {
		if math.Abs(c.got-c.want) > tol {
			t.Errorf("snapped %g, want %g", c.got, c.want)
		}
	}
	if again := adj.Snap(&v, sn); again != sn {
		t.Errorf("snap is not idempotent: %+v then %+v", sn, again)
	}
	if adj.Clicks(&v, &sn) != got {
		t.Errorf("the snapped setup's clicks differ")
	}
}

// TestOutOfBand: a linear damper (no knee) has force ζ c_crit/MR² v at
// the damper (package doc: c_damper = ζ c_crit / MR², c_crit =
// 2 sqrt(k_w m_s)). At ratio 1.5 against a stiffest click of 1.2 the
// setup is above by (1.5 - 1.2) c_crit/MR² u at every speed u, 25 % of
// the stiffest force at each, so the slowest speed is reported; at 0.2
// against a softest of 0.4 below by 0.2 c_crit/MR² u (50 %). Tolerance
// 1e-9 relative (rounding).
func TestOutOfBand(t *testing.T) {
	t.Parallel()
	v := demoCar()
	adj := Adjusters{}
	for ax := range adj.Axles {
		adj.Axles[ax].LowBump = Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4}
		adj.Axles[ax].LowRebound = Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4}
	}
	s := Setup{Axles: [2]AxleDamping{{BumpRatio: 1.5, ReboundRatio: 0.8}, {BumpRatio: 0.9, ReboundRatio: 0.2}}}
	got, err := OutOfBand(&v, &s, &adj, BandVelocities)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 4 {
		t.Fatalf("%d excesses, want front bump and rear rebound on both sides: %v", len(got), got)
	}
	umax := BandVelocities[0]
	for _, e := range got {
		c := &v.Corners[e.Corner]
		ms := v.SprungCornerLoads()[e.Corner] / Gravity
		cc := 2 * math.Sqrt(c.WheelRateOf()*ms)
		mr2 := c.DamperMotionRatio * c.DamperMotionRatio
		var want float64
		var above bool
		switch {
		case e.Corner < 2 && !e.Rebound:
			want, above = 0.3*cc/mr2*umax, true
		case e.Corner >= 2 && e.Rebound:
			want = 0.2 * cc / mr2 * umax
		default:
			t.Errorf("unexpected excess %v", e)
			continue
		}
		if relErr(e.Over, want) > 1e-9 || e.Above != above || e.Speed != umax {
			t.Errorf("%v: over %.6g N, want %.6g N at %g m/s (above %v)", e, e.Over, want, umax, above)
		}
		t.Log(e)
	}
	inside := Setup{Axles: [2]AxleDamping{{BumpRatio: 1.2, ReboundRatio: 0.4}, {BumpRatio: 0.7, ReboundRatio: 0.9}}}
	if got, err := OutOfBand(&v, &inside, &adj, BandVelocities); err != nil || got != nil {
		t.Errorf("a setup on the band's edges: %v, %v; want none", got, err)
	}
}

// dynoTable is a five-click bump table at 25, 50, 100, 200 mm/s,
// stiffest first (invented figures).
func dynoTable() *DynoTable {
	return &DynoTable{Velocity: []float64{0.025, 0.05, 0.1, 0.2}, Force: [][]float64{
		{400, 750, 1100, 1500}, {340, 640, 960, 1330}, {280, 530, 820, 1160}, {220, 420, 680, 990}, {160, 310, 540, 820}}}
}

// TestDynoTableClicksAndBand: with a dyno table the click's ratio is its
// low-speed slope F(v_0)/v_0 · MR²/c_crit, and the band is the table's
// softest and stiffest rows read linearly (worked by hand from the table).
func TestDynoTableClicksAndBand(t *testing.T) {
	t.Parallel()
	v := demoCar()
	adj := Adjusters{}
	adj.Axles[0].LowBump = Adjuster{Clicks: 5, Dyno: dynoTable()}
	if err := adj.Validate(); err != nil {
		t.Fatal(err)
	}
	cc := v.CriticalDamping()[0]
	mr2 := v.Corners[0].DamperMotionRatio * v.Corners[0].DamperMotionRatio
	ratio := func(f float64) float64 { return f / 0.025 * mr2 / cc }
	s := Setup{Axles: [2]AxleDamping{{BumpRatio: ratio(290), ReboundRatio: 0.8}, {BumpRatio: 0.8, ReboundRatio: 0.8}}}
	if c := adj.Clicks(&v, &s)[0]; c.LowBump != 2 || c.LowRebound != -1 || c.HighBump != -1 {
		t.Errorf("clicks %+v, want LS bump 2 (280 N is the nearest of the table's first column to 290 N), others none", c)
	}
	if sn := adj.Snap(&v, s); relErr(sn.Axles[0].BumpRatio, ratio(280)) > 1e-12 {
		t.Errorf("snapped ratio %g, want %g", sn.Axles[0].BumpRatio, ratio(280))
	}
	// A linear damper of 15000 N s/m at the damper: 375 N at 25 mm/s (in
	// [160, 400]), 750 N at 50 (in [310, 750]), 1500 N at 100 mm/s, above
	// the stiffest 1100 N by 400 N (36 %), and 3000 N at 200 mm/s, above
	// 1500 by 1500 N (100 %): the worst; none read beyond 200 mm/s.
	s.Axles[0].BumpRatio = 15000 * mr2 / cc
	got, err := OutOfBand(&v, &s, &adj, []float64{0.025, 0.05, 0.1, 0.2, 0.3})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || !got[0].Above || got[0].Speed != 0.2 || relErr(got[0].Over, 1500) > 1e-9 || relErr(got[0].Stiffest, 1500) > 1e-12 {
		t.Errorf("got %v, want FL and FR bump 1500 N above 1500 N at 200 mm/s", got)
	}
}

// TestBadAdjustersAreRefusedNamingTheField: a click table with gaps or
// non-monotonic forces, and other bad adjusters, come back naming the field.
func TestBadAdjustersAreRefusedNamingTheField(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name  string
		mod   func(*DamperAdjusters)
		field string
		words string
	}{
		{"missing click row", func(d *DamperAdjusters) { d.LowBump.Dyno.Force = d.LowBump.Dyno.Force[:4] }, "front.low_bump.dyno.rows", "missing"},
		{"gap in a row", func(d *DamperAdjusters) { d.LowBump.Dyno.Force[2] = []float64{280, 530, 820} }, "front.low_bump.dyno.rows[2].force_n", "gap"},
		{"force falls with velocity", func(d *DamperAdjusters) { d.LowBump.Dyno.Force[1][2] = 600 }, "front.low_bump.dyno.rows[1].force_n[2]", "rise with velocity"},
		{"force rises over clicks", func(d *DamperAdjusters) { d.LowBump.Dyno.Force[3][0] = 300 }, "front.low_bump.dyno.rows[3].force_n[0]", "must not rise"},
		{"negative force", func(d *DamperAdjusters) { d.LowBump.Dyno.Force[4][0] = -5 }, "front.low_bump.dyno.rows[4].force_n[0]", ">= 0"},
		{"velocities out of order", func(d *DamperAdjusters) { d.LowBump.Dyno.Velocity[2] = 0.04 }, "front.low_bump.dyno.velocity_m_per_s[2]", ""},
		{"one click", func(d *DamperAdjusters) { d.LowRebound = Adjuster{Clicks: 1, Stiffest: 1, Softest: 0.5} }, "front.low_rebound.clicks", "[2, 200]"},
		{"softest above stiffest", func(d *DamperAdjusters) { d.HighRebound = Adjuster{Clicks: 4, Stiffest: 0.3, Softest: 0.8} }, "front.high_rebound.softest", "<= stiffest"},
		{"negative factor", func(d *DamperAdjusters) { d.HighBump = Adjuster{Clicks: 4, Stiffest: 0.8, Softest: -0.1} }, "front.high_bump.softest", "must be in"},
		{"dyno on high speed", func(d *DamperAdjusters) { d.HighBump = Adjuster{Clicks: 5, Dyno: dynoTable()} }, "front.high_bump.dyno", "low-speed"},
		{"settings without clicks", func(d *DamperAdjusters) { d.HighBump = Adjuster{Stiffest: 0.8, Softest: 0.3} }, "front.high_bump.clicks", "must be given"},
	}
	for _, tc := range tests {
		adj := Adjusters{}
		adj.Axles[0].LowBump = Adjuster{Clicks: 5, Dyno: dynoTable()}
		tc.mod(&adj.Axles[0])
		wantProblem(t, tc.name, adj.Validate(), tc.field, tc.words)
	}
}

// wantProblem requires err to be a *ValidationError with a problem at
// field whose reason contains words.
func wantProblem(t *testing.T, name string, err error, field, words string) {
	t.Helper()
	var ve *ValidationError
	if !errors.As(err, &ve) {
		t.Errorf("%s: got %v, want a problem at %s", name, err, field)
		return
	}
	for _, p := range ve.Problems {
		if p.Field == field && strings.Contains(p.Reason, words) {
			return
		}
	}
	t.Errorf("%s: %v, want %s: ...%s...", name, err, field, words)
}

// TestDesignSpaceSnapsDecodedSetups: with Snap set, every decoded setup
// lies on its clicks, and decoding is a pure function of the genes (the
// same genes give the same setup, bit for bit).
func TestDesignSpaceSnapsDecodedSetups(t *testing.T) {
	t.Parallel()
	v := demoCar()
	adj := linearAdjusters()
	r := Range{Min: 0.3, Max: 1.4}
	d := DesignSpace{Ratios: [4]Range{r, r, r, r}, Base: demoSetup(), Snap: &ClickSnap{Vehicle: &v, Adjusters: &adj}}
	x := []float64{0.87, 0.41, 1.33, 0.64}
	s := d.Decode(x)
	for _, c := range []struct{ got, want float64 }{
		{s.Axles[0].BumpRatio, 0.9}, {s.Axles[0].ReboundRatio, 0.4}, {s.Axles[1].BumpRatio, 1.2}, {s.Axles[1].ReboundRatio, 0.6},
		{s.Axles[0].HighSpeedBump, 0.45}, {s.Axles[1].HighSpeedRebound, 0.6},
	} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("decoded %g, want the click's %g (worked by hand as in TestClicksAndSnap)", c.got, c.want)
		}
	}
	if d.Decode(x) != s {
		t.Error("decoding twice differs")
	}
}
