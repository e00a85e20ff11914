package model

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// ManoeuvreShape names a built-in driver input, or a table.
type ManoeuvreShape int

// The built-in shapes. r(t) rises linearly from 0 at Start to 1 at
// Start + Ramp (a step when Ramp is 0); A_x = Longitudinal, A_y = Lateral.
const (
	ShapeBrake        ManoeuvreShape = iota + 1 // a_x = −A_x r(t): brake step or ramp
	ShapeBrakeRelease                           // a_x = −A_x (1 − r(t))
	ShapeThrottle                               // a_x = +A_x r(t)
	ShapeTurnIn                                 // a_y = A_y r(t): ramp steer
	ShapeTrailBrake                             // a_x = −A_x (1 − r(t)), a_y = A_y r(t): trail-braking entry
	ShapeTable                                  // the logged Table
)

var shapeNames = map[ManoeuvreShape]string{
	ShapeBrake: "brake", ShapeBrakeRelease: "brake_release", ShapeThrottle: "throttle",
	ShapeTurnIn: "turn_in", ShapeTrailBrake: "trail_brake", ShapeTable: "table",
}

func (s ManoeuvreShape) String() string { return enumName(shapeNames, s, "shape") }

// Manoeuvre is a driver-input case: the longitudinal and lateral
// acceleration of the sprung CG against time, with the speed, from the
// car's operating point at Speed. Signs as in the package doc: a_x > 0
// forward (throttle), a_y > 0 to the left (a left-hand turn).
type Manoeuvre struct {
	Name  string
	Shape ManoeuvreShape
	// Speed is the case's speed (m/s): the operating point, and the
	// speed throughout a built-in shape (downforce held).
	Speed float64
	// Longitudinal and Lateral are the built-in shape's amplitudes (m/s²,
	// >= 0; a negative Lateral turns right).
	Longitudinal, Lateral float64
	// Start is when the input begins to change (s); Ramp how long it
	// takes (s, 0 = a step).
	Start, Ramp float64
	// Duration is the simulated time (s); 0 means Start + Ramp + 1.2 s (a
	// table: its last time).
	Duration float64
	// Table is the logged history of ShapeTable, strictly increasing in
	// time from 0; linear between points, held after the last.
	Table []ManoeuvrePoint
	// Weight is the case's weight in the objectives (0 = 1).
	Weight float64
}

// ManoeuvrePoint is one row of a logged history.
type ManoeuvrePoint struct {
	Time  float64 // (s)
	Ax    float64 // longitudinal acceleration (m/s²)
	Ay    float64 // lateral acceleration (m/s²)
	Speed float64 // (m/s)
}

// defaultTail is the time simulated after a built-in shape's ramp (s):
// a ride mode at 1.5 Hz with ζ = 0.3 decays to 3 % in ln(33)/(ζω) ≈ 1.2 s
// (give Duration for a lightly damped car).
const defaultTail = 1.2

func (m *Manoeuvre) duration() float64 {
	switch {
	case m.Duration > 0:
		return m.Duration
	case m.Shape == ShapeTable && len(m.Table) > 0:
		return m.Table[len(m.Table)-1].Time
	}
	return m.Start + m.Ramp + defaultTail
}

func (m *Manoeuvre) weight() float64 {
	if m.Weight == 0 {
		return 1
	}
	return m.Weight
}

// input returns a_x, a_y (m/s²) and the speed (m/s) at time t (s).
func (m *Manoeuvre) input(t float64) (ax, ay, v float64) {
	if m.Shape == ShapeTable {
		return m.tableAt(t)
	}
	r := 1.0
	switch {
	case t < m.Start:
		r = 0
	case m.Ramp > 0 && t < m.Start+m.Ramp:
		r = (t - m.Start) / m.Ramp
	}
	switch m.Shape {
	case ShapeBrake:
		ax = -m.Longitudinal * r
	case ShapeBrakeRelease:
		ax = -m.Longitudinal * (1 - r)
	case ShapeThrottle:
		ax = m.Longitudinal * r
	case ShapeTurnIn:
		ay = m.Lateral * r
	case ShapeTrailBrake:
		ax, ay = -m.Longitudinal*(1-r), m.Lateral*r
	}
	return ax, ay, m.Speed
}

func (m *Manoeuvre) tableAt(t float64) (ax, ay, v float64) {
	tb := m.Table
	if t <= tb[0].Time {
		return tb[0].Ax, tb[0].Ay, tb[0].Speed
	}
	for k := 1; k < len(tb); k++ {
		if t <= tb[k].Time {
			p, q := tb[k-1], tb[k]
			f := (t - p.Time) / (q.Time - p.Time)
			return p.Ax + f*(q.Ax-p.Ax), p.Ay + f*(q.Ay-p.Ay), p.Speed + f*(q.Speed-p.Speed)
		}
	}
	last := tb[len(tb)-1]
	return last.Ax, last.Ay, last.Speed
}

// maxManoeuvrePoints bounds a logged table's rows.
const maxManoeuvrePoints = 100000

// Validate checks the case and names every bad field.
func (m *Manoeuvre) Validate() error {
	var p problems
	p.text("name", m.Name)
	if _, ok := shapeNames[m.Shape]; !ok {
		p.add("shape", "unknown shape %d: use brake, brake_release, throttle, turn_in, trail_brake or table", int(m.Shape))
	}
	p.in("weight", m.Weight, "RoadCase.weight")
	p.in("duration_s", m.Duration, "Manoeuvre.time_s")
	if m.Shape != ShapeTable {
		p.in("speed_m_per_s", m.Speed, "RoadCase.speed_m_per_s")
		p.in("longitudinal_m_per_s2", m.Longitudinal, "Manoeuvre.acceleration_m_per_s2")
		p.in("lateral_m_per_s2", m.Lateral, "Manoeuvre.acceleration_m_per_s2")
		if m.Longitudinal < 0 {
			p.add("longitudinal_m_per_s2", "must be >= 0 (the shape gives the sign), got %s", num(m.Longitudinal))
		}
		p.in("start_s", m.Start, "Manoeuvre.time_s")
		p.in("ramp_s", m.Ramp, "Manoeuvre.time_s")
		if len(m.Table) > 0 {
			p.add("table", "is for the table shape only, got %d rows on %s", len(m.Table), m.Shape)
		}
		if m.Duration > 0 && m.Duration <= m.Start+m.Ramp {
			p.add("duration_s", "must be longer than start + ramp (%g s), got %s", m.Start+m.Ramp, num(m.Duration))
		}
		return p.err()
	}
	if len(m.Table) < 2 || len(m.Table) > maxManoeuvrePoints {
		p.add("table", "needs 2 to %d rows, got %d", maxManoeuvrePoints, len(m.Table))
		return p.err()
	}
	if m.Table[0].Time != 0 {
		p.add("table[0].time_s", "must be 0, got %s", num(m.Table[0].Time))
	}
	for k, r := range m.Table {
		f := fmt.Sprintf("table[%d].", k)
		p.in(f+"time_s", r.Time, "Manoeuvre.time_s")
		p.in(f+"ax_m_per_s2", r.Ax, "Manoeuvre.acceleration_m_per_s2")
		p.in(f+"ay_m_per_s2", r.Ay, "Manoeuvre.acceleration_m_per_s2")
		p.in(f+"speed_m_per_s", r.Speed, "RoadCase.speed_m_per_s")
		if k > 0 && !(r.Time > m.Table[k-1].Time) {
			p.add(f+"time_s", "must be after the row before (%s s), got %s: the table is out of order", num(m.Table[k-1].Time), num(r.Time))
		}
	}
	if m.Duration > 0 && m.Duration > m.Table[len(m.Table)-1].Time {
		p.add("duration_s", "must not pass the table's last time (%g s), got %s", m.Table[len(m.Table)-1].Time, num(m.Duration))
	}
	return p.err()
}

// ReadManoeuvreTable reads a logged history as CSV text: one row per line,
// time (s), a_x (g), a_y (g), speed (m/s), separated by commas or
// blanks; a first line that does not parse as numbers is a header, lines
// starting with # are comments. Accelerations are converted to m/s² with
// Gravity. Errors name the line. The rows are checked by
// Manoeuvre.Validate.
func ReadManoeuvreTable(r io.Reader) ([]ManoeuvrePoint, error) {
	var out []ManoeuvrePoint
	sc := bufio.NewScanner(r)
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		fields := strings.FieldsFunc(text, func(r rune) bool { return r == ',' || r == ' ' || r == '\t' || r == ';' })
		var v [4]float64
		var err error
		if len(fields) != 4 {
			err = fmt.Errorf("needs 4 columns (time_s, ax_g, ay_g, speed_m_per_s), got %d", len(fields))
		}
		for k := 0; err == nil && k < 4; k++ {
			v[k], err = strconv.ParseFloat(fields[k], 64)
			if err == nil && !finiteAll(v[k]) {
				err = fmt.Errorf("column %d is not finite", k+1)
			}
		}
		if err != nil {
			if len(out) == 0 && line == 1 {
				continue // a header
			}
			return nil, &ValidationError{Problems: []FieldError{{Field: fmt.Sprintf("table line %d", line), Reason: err.Error()}}}
		}
		if len(out) >= maxManoeuvrePoints {
			return nil, &ValidationError{Problems: []FieldError{{Field: "table", Reason: fmt.Sprintf("has more than %d rows", maxManoeuvrePoints)}}}
		}
		out = append(out, ManoeuvrePoint{Time: v[0], Ax: v[1] * Gravity, Ay: v[2] * Gravity, Speed: v[3]})
	}
	if err := sc.Err(); err != nil {
		return nil, err
	}
	return out, nil
}

// speedRange returns the lowest and highest speed of the case (m/s).
func (m *Manoeuvre) speedRange() (lo, hi float64) {
	if m.Shape != ShapeTable {
		return m.Speed, m.Speed
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, r := range m.Table {
		lo, hi = math.Min(lo, r.Speed), math.Max(hi, r.Speed)
	}
	return lo, hi
}

// enumName is the name of k in names, or kind(k) for an unknown value.
func enumName[K ~int](names map[K]string, k K, kind string) string {
	if n, ok := names[k]; ok {
		return n
	}
	return fmt.Sprintf("%s(%d)", kind, int(k))
}
