package study

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"math"

	"dampfront/model"
)

// The checkpoint of a run whose refinement has checked some points wraps
// the optimiser's checkpoint (little-endian throughout):
//
//	magic "dfrefine", version u32 (= 1),
//	search:  length u64, the optimiser's checkpoint bytes,
//	front:   points u64 (the front's size), checked u64,
//	checked: per point in front order: index u64, failed str, and when
//	         failed is empty: objectives, their errors, sources,
//	         violations, their errors, sources (each a count u64 and the
//	         values: f64, or u32 for a source), feasibility unsettled
//	         (u8), cases u64, per case: name str, step f64, settle f64,
//	         rows u64, per row: metric str, frequency, time, diff,
//	         relative diff, statistical error (f64 each).
//
// str is a length u64 and the bytes; f64 the IEEE-754 bits, so the
// figures come back bit for bit. A run with no refined point, and every
// run without a refinement, writes the optimiser's checkpoint alone, as
// before the refinement existed.
const (
	refineMagic   = "dfrefine"
	refineVersion = 1
)

// splitCheckpoint returns the optimiser's part of a checkpoint and the
// refinement's part, nil when there is none.
func splitCheckpoint(b []byte) (search, refine []byte, err error) {
	if !bytes.HasPrefix(b, []byte(refineMagic)) {
		return b, nil, nil
	}
	d := &ckDecoder{b: b[len(refineMagic):]}
	if v := d.u32(); d.err == nil && v != refineVersion {
		return nil, nil, fmt.Errorf("refinement checkpoint: version %d, this package reads %d", v, refineVersion)
	}
	n := d.u64()
	search = d.take(n)
	if d.err != nil {
		return nil, nil, d.err
	}
	return search, d.b, nil
}

// wrapCheckpoint frames the optimiser's checkpoint with the refinement's
// checked points; with none it is the optimiser's alone.
func (st *refineStage) wrapCheckpoint(search []byte) []byte {
	if st == nil {
		return search
	}
	checked := 0
	for _, p := range st.points {
		if p != nil {
			checked++
		}
	}
	if checked == 0 {
		return search
	}
	e := &ckEncoder{}
	e.buf = append(e.buf, refineMagic...)
	e.u32(refineVersion)
	e.u64(uint64(len(search)))
	e.buf = append(e.buf, search...)
	e.u64(uint64(len(st.points)))
	e.u64(uint64(checked))
	for i, p := range st.points {
		if p != nil {
			e.u64(uint64(i))
			e.point(p)
		}
	}
	return e.buf
}

// restore reads the refinement's part of a checkpoint.
func (st *refineStage) restore(b []byte) error {
	if b == nil {
		return nil
	}
	if st == nil {
		return errors.New("refinement checkpoint for a spec without a refinement")
	}
	d := &ckDecoder{b: b}
	n := d.int()
	checked := d.int()
	points := make([]*RefinedPoint, n)
	for k := 0; k < checked && d.err == nil; k++ {
		i := d.int()
		if i >= n {
			d.fail("point %d of a front of %d", i, n)
			break
		}
		points[i] = d.point()
	}
	if d.err == nil && len(d.b) != 0 {
		d.fail("%d bytes after the last point", len(d.b))
	}
	if d.err != nil {
		return d.err
	}
	st.points = points
	return nil
}

type ckEncoder struct{ buf []byte }

func (e *ckEncoder) u32(v uint32)  { e.buf = binary.LittleEndian.AppendUint32(e.buf, v) }
func (e *ckEncoder) u64(v uint64)  { e.buf = binary.LittleEndian.AppendUint64(e.buf, v) }
func (e *ckEncoder) f64(v float64) { e.u64(math.Float64bits(v)) }
func (e *ckEncoder) str(s string)  { e.u64(uint64(len(s))); e.buf = append(e.buf, s...) }
func (e *ckEncoder) f64s(v []float64) {
	e.u64(uint64(len(v)))
	for _, x := range v {
		e.f64(x)
	}
}
func (e *ckEncoder) sources(v []model.RefineSource) {
	e.u64(uint64(len(v)))
	for _, s := range v {
		e.u32(uint32(s))
	}
}

func (e *ckEncoder) point(p *RefinedPoint) {
	e.str(p.Failed)
	if p.Failed != "" {
		return
	}
	e.f64s(p.Objectives)
	e.f64s(p.ObjectiveErrors)
	e.sources(p.ObjectiveSource)
	e.f64s(p.Violations)
	e.f64s(p.ViolationErrors)
	e.sources(p.ViolationSource)
	if p.FeasibilityUnsettled {
		e.buf = append(e.buf, 1)
	} else {
		e.buf = append(e.buf, 0)
	}
	e.u64(uint64(len(p.Cases)))
	for _, c := range p.Cases {
		e.str(c.Case)
		e.f64(c.Time.Step)
		e.f64(c.Time.Settle)
		e.u64(uint64(len(c.Rows)))
		for _, r := range c.Rows {
			e.str(r.Metric)
			for _, x := range [...]float64{r.Frequency, r.Time, r.Diff, r.RelDiff, r.StatError} {
				e.f64(x)
			}
		}
	}
}

type ckDecoder struct {
	b   []byte
	err error
}

func (d *ckDecoder) fail(format string, args ...any) {
	if d.err == nil {
		d.err = fmt.Errorf("refinement checkpoint: "+format, args...)
	}
}

func (d *ckDecoder) take(n uint64) []byte {
	if d.err != nil {
		return nil
	}
	if n > uint64(len(d.b)) {
		d.fail("truncated")
		return nil
	}
	out := d.b[:n]
	d.b = d.b[n:]
	return out
}

func (d *ckDecoder) u32() uint32 {
	if b := d.take(4); b != nil {
		return binary.LittleEndian.Uint32(b)
	}
	return 0
}

func (d *ckDecoder) u64() uint64 {
	if b := d.take(8); b != nil {
		return binary.LittleEndian.Uint64(b)
	}
	return 0
}

// int reads a count, refusing one larger than the bytes left could hold.
func (d *ckDecoder) int() int {
	v := d.u64()
	if v > uint64(len(d.b))+1<<20 {
		d.fail("count %d beyond the checkpoint's size", v)
		return 0
	}
	return int(v)
}

func (d *ckDecoder) f64() float64 { return math.Float64frombits(d.u64()) }
func (d *ckDecoder) str() string  { return string(d.take(uint64(d.int()))) }

func (d *ckDecoder) f64s() []float64 {
	n := d.int()
	var out []float64
	for k := 0; k < n && d.err == nil; k++ {
		out = append(out, d.f64())
	}
	return out
}

func (d *ckDecoder) sources() []model.RefineSource {
	n := d.int()
	var out []model.RefineSource
	for k := 0; k < n && d.err == nil; k++ {
		out = append(out, model.RefineSource(d.u32()))
	}
	return out
}

func (d *ckDecoder) point() *RefinedPoint {
	p := &RefinedPoint{Failed: d.str()}
	if p.Failed != "" {
		return p
	}
	p.Objectives, p.ObjectiveErrors, p.ObjectiveSource = d.f64s(), d.f64s(), d.sources()
	p.Violations, p.ViolationErrors, p.ViolationSource = d.f64s(), d.f64s(), d.sources()
	if b := d.take(1); b != nil {
		p.FeasibilityUnsettled = b[0] == 1
	}
	nc := d.int()
	for c := 0; c < nc && d.err == nil; c++ {
		vc := model.VerifyCase{Case: d.str()}
		vc.Time.Step, vc.Time.Settle = d.f64(), d.f64()
		nr := d.int()
		for k := 0; k < nr && d.err == nil; k++ {
			r := model.VerifyRow{Metric: d.str()}
			r.Frequency, r.Time, r.Diff, r.RelDiff, r.StatError = d.f64(), d.f64(), d.f64(), d.f64(), d.f64()
			vc.Rows = append(vc.Rows, r)
		}
		p.Cases = append(p.Cases, vc)
	}
	return p
}
