package tradeunit

import (
	"math"
	"testing"

	"dampfront/model"
)

// The units against their definitions: the SI prefix milli = 1e-3 (BIPM,
// The International System of Units, 9th ed. 2019, Table 7), the degree =
// π/180 rad (ibid., Table 8) and the standard acceleration of gravity g_n =
// 9.80665 m/s² (3rd CGPM, 1901; ISO 80000-3:2019, 3-9.1). Tolerance: one part in
// 1e15, the rounding of one multiplication or division of float64 values.
func TestUnits(t *testing.T) {
	t.Parallel()
	const tol = 1e-15
	tests := []struct {
		name      string
		got, want float64
	}{
		{"1 m is 1000 mm", Millimetre.Of(1), 1000},
		{"0.05 m/s is 50 mm/s", MillimetrePerSecond.Of(0.05), 50},
		{"250 mm/s is 0.25 m/s", MillimetrePerSecond.SI(250), 0.25},
		{"12140 N s/m is 12.14 N s/mm", NewtonSecondPerMM.Of(12140), 12.14},
		{"0.089 is 8.9 %", Percent.Of(0.089), 8.9},
		{"0.089 of static is 8.9 % static", PercentStatic.Of(0.089), 8.9},
		{"π rad is 180 deg", Degree.Of(math.Pi), 180},
		{"9.80665 m/s² is 1 g", Gravity.Of(9.80665), 1},
		{"1e-6 m²/Hz is 1 mm²/Hz", MillimetreSquaredPerHertz.Of(1e-6), 1},
	}
	for _, tt := range tests {
		if math.Abs(tt.got-tt.want) > tol*math.Abs(tt.want) {
			t.Errorf("%s: got %.17g", tt.name, tt.got)
		}
	}
}

// Every objective and constraint kind of the model is in the table, with
// a trade unit, a label, an axis title and its own SI column.
func TestEveryKindIsInTheTable(t *testing.T) {
	t.Parallel()
	seen := map[string]bool{}
	for k := model.ObjectiveGrip; k <= model.ObjectiveHeaveAccel; k++ {
		q := Objective(k)
		if q.Unit.Symbol == "" || q.Unit.Symbol == "SI" || q.Label == "" || q.Title == "" || q.Column == "" || seen[q.Column] {
			t.Errorf("%v: %+v", k, q)
		}
		seen[q.Column] = true
	}
	for k := model.ConstraintLiftOff; k <= model.ConstraintJacking; k++ {
		if q := Constraint(k); q.Unit.Symbol == "" || q.Unit.Symbol == "SI" || q.Label == "" || q.Column == "" {
			t.Errorf("%v: %+v", k, q)
		}
	}
	if q := Objective(0); q.Unit.Symbol != "SI" || q.Unit.Scale != 1 {
		t.Errorf("an unknown kind is shown as %+v, want SI", q)
	}
	if q := Gene("front_knee_m_per_s"); q.Label != "front knee" || q.Unit != MillimetrePerSecond {
		t.Errorf("knee gene %+v", q)
	}
}
