package optimizer

import (
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"math"
	"slices"
)

// Checkpoint format. All integers little-endian, floats as their IEEE-754
// bits (math.Float64bits), so a restored search continues bit for bit:
//
//	magic "dfnsga2\n", version u32 (= checkpointVersion)
//	settings:  Settings.fingerprint, u64 each;
//	           (version 4 on) Settings.variationFingerprint, u64 each;
//	           ReferencePoint: present u8 [+ M f64]
//	problem:   genes u32, bounds (Lo, Hi f64) per gene, M u32, constraints u32
//	state:     started u8, generation u64, evaluations u64,
//	           reference point: present u8 [+ M f64]
//	islands:   count u32; per island count u32; per individual
//	           genes, objectives, violations f64…, total f64, reason str,
//	           evaluated u8, fresh u8, born u64, fitness f64
//	archive:   count u32; per solution genes, objectives, violations f64…
//	closest:   count u32; per solution genes, objectives, violations f64…,
//	           reason str (version 2 on; version 1 has no such part)
//	history:   count u32; per entry generation u64, evaluations u64,
//	           hypervolume f64, best: present u8 [+ M f64]
//	polish:    (version 3) points u64, evaluations u64, improved u64,
//	           hypervolume f64; (version 4) present u8 [+ the same];
//	           (version 5) present u8 [+ the same, rounds u64, replaced u64]
//	checksum   CRC-32 (IEEE) of everything before it, u32
//
// where str is a u32 length and the bytes. The settings and problem shape
// are stored in clear, so a mismatch on restore names the field. Equal
// states give equal bytes.
// Version 1 had no closest part; it restores with an empty one (a search
// that has found no feasible point yet fills it again from the next
// generation on). Version 3 is written only by a polished search (see
// Search.Polish), so an unpolished search keeps writing the bytes of
// version 2. Version 4 is written only by a search whose Variation is not
// VariationSBX, so searches with the earlier settings keep writing the
// bytes of versions 2 and 3. Version 5 is written only by a search whose
// polish ran neighbourhood rounds (Polish.Neighbourhood), so a polish
// without them keeps writing the bytes of versions 3 and 4.
const (
	checkpointMagic   = "dfnsga2\n"
	checkpointVersion = 5
	unpolishedVersion = 2
	polishedVersion   = 3
	variationVersion  = 4
)

// version is the checkpoint version s writes.
func (s *Search) version() uint32 {
	switch {
	case s.polish != nil && s.polish.Rounds > 0:
		return checkpointVersion
	case s.settings.Variation != VariationSBX:
		return variationVersion
	case s.polish != nil:
		return polishedVersion
	}
	return unpolishedVersion
}

// Checkpoint returns the full state of the search: populations, archive,
// generation, counters, reference point, history and the settings that
// fix the run. Restore continues from it bit for bit.
func (s *Search) Checkpoint() ([]byte, error) {
	var e encoder
	e.buf = append(e.buf, checkpointMagic...)
	version := s.version()
	e.u32(version)

	for _, f := range s.settings.fingerprint() {
		e.u64(f.bits)
	}
	if version >= 4 {
		for _, f := range s.settings.variationFingerprint() {
			e.u64(f.bits)
		}
	}
	e.optional(s.settings.ReferencePoint)

	e.u32(uint32(len(s.shape.bounds)))
	for _, b := range s.shape.bounds {
		e.f64(b.Lo)
		e.f64(b.Hi)
	}
	e.u32(uint32(s.shape.nObj))
	e.u32(uint32(s.shape.nCon))

	e.bool(s.started)
	e.u64(uint64(s.generation))
	e.u64(uint64(s.evaluations))
	e.optional(s.ref)

	e.u32(uint32(len(s.pops)))
	for _, pop := range s.pops {
		e.u32(uint32(len(pop)))
		for _, r := range pop {
			g := r.g
			e.f64s(g.genes)
			e.f64s(g.obj)
			e.f64s(g.viol)
			e.f64(g.total)
			e.str(g.reason)
			e.bool(g.evaluated)
			e.bool(g.fresh)
			e.u64(uint64(g.born))
			e.f64(r.fitness)
		}
	}

	e.u32(uint32(len(s.front.sols)))
	for _, sol := range s.front.sols {
		e.f64s(sol.Genes)
		e.f64s(sol.Objectives)
		e.f64s(sol.Violations)
	}
	e.u32(uint32(len(s.front.closest)))
	for _, sol := range s.front.closest {
		e.f64s(sol.Genes)
		e.f64s(sol.Objectives)
		e.f64s(sol.Violations)
		e.str(sol.Reason)
	}

	e.u32(uint32(len(s.history)))
	for _, p := range s.history {
		e.u64(uint64(p.Generation))
		e.u64(uint64(p.Evaluations))
		e.f64(p.Hypervolume)
		e.optional(p.Best)
	}
	if version >= 4 {
		e.bool(s.polish != nil)
	}
	if r := s.polish; r != nil {
		e.u64(uint64(r.Points))
		e.u64(uint64(r.Evaluations))
		e.u64(uint64(r.Improved))
		e.f64(r.Hypervolume)
		if version >= 5 {
			e.u64(uint64(r.Rounds))
			e.u64(uint64(r.Replaced))
		}
	}
	e.u32(crc32.ChecksumIEEE(e.buf))
	return e.buf, nil
}

// Restore returns a search of p with settings s in the state of checkpoint,
// which Checkpoint wrote for the same problem and settings. Workers,
// Generations and Progress may differ; every other setting and the
// problem's shape must match, or the error is a *FieldError naming the
// field. Unreadable bytes give an error wrapping ErrCheckpoint.
func Restore(p Problem, s Settings, checkpoint []byte) (*Search, error) {
	st, err := New(p, s)
	if err != nil {
		return nil, err
	}
	if len(checkpoint) < len(checkpointMagic)+8 || string(checkpoint[:len(checkpointMagic)]) != checkpointMagic {
		return nil, fmt.Errorf("%w: not a checkpoint of this package", ErrCheckpoint)
	}
	body, sum := checkpoint[:len(checkpoint)-4], binary.LittleEndian.Uint32(checkpoint[len(checkpoint)-4:])
	if crc32.ChecksumIEEE(body) != sum {
		return nil, fmt.Errorf("%w: checksum mismatch", ErrCheckpoint)
	}
	d := decoder{buf: body[len(checkpointMagic):]}
	v := d.u32()
	if v < 1 || v > checkpointVersion {
		return nil, fmt.Errorf("%w: version %d, this package reads 1 to %d", ErrCheckpoint, v, checkpointVersion)
	}
	if err := st.readSettings(&d, v); err != nil {
		return nil, err
	}
	if err := st.readState(&d, v); err != nil {
		return nil, err
	}
	if d.err == nil && len(d.buf) != 0 {
		d.fail("%d bytes after the history", len(d.buf))
	}
	if d.err != nil {
		return nil, d.err
	}
	return st, nil
}

// readSettings compares the stored settings and problem shape of a
// checkpoint of the given version with the search's.
func (s *Search) readSettings(d *decoder, version uint32) error {
	st := &s.settings
	mismatch := func(field string, stored, given any) error {
		return &FieldError{Field: field, Msg: fmt.Sprintf("checkpoint was written with %v, given %v", stored, given)}
	}
	for _, f := range st.fingerprint() {
		if v := d.u64(); d.err == nil && v != f.bits {
			return mismatch("Settings."+f.field, f.show(v), f.show(f.bits))
		}
	}
	for _, f := range st.variationFingerprint() {
		v := uint64(0) // before version 4: SBX, weights 0
		if version >= 4 {
			v = d.u64()
		}
		if d.err == nil && v != f.bits {
			return mismatch("Settings."+f.field, f.show(v), f.show(f.bits))
		}
	}
	if ref := d.optional(s.shape.nObj); d.err == nil && !sameBits(ref, st.ReferencePoint) {
		return mismatch("Settings.ReferencePoint", ref, st.ReferencePoint)
	}

	if n := int(d.u32()); d.err == nil && n != len(s.shape.bounds) {
		return mismatch("Problem.Bounds", fmt.Sprintf("%d genes", n), fmt.Sprintf("%d genes", len(s.shape.bounds)))
	}
	for i, b := range s.shape.bounds {
		lo, hi := d.f64(), d.f64()
		if d.err == nil && (math.Float64bits(lo) != math.Float64bits(b.Lo) || math.Float64bits(hi) != math.Float64bits(b.Hi)) {
			return mismatch(fmt.Sprintf("Problem.Bounds[%d]", i), Bound{lo, hi}, b)
		}
	}
	if m := int(d.u32()); d.err == nil && m != s.shape.nObj {
		return mismatch("Problem.NumObjectives", m, s.shape.nObj)
	}
	if c := int(d.u32()); d.err == nil && c != s.shape.nCon {
		return mismatch("Problem.NumConstraints", c, s.shape.nCon)
	}
	return d.err
}

// readState reads the state part of a checkpoint of the given version
// into s.
func (s *Search) readState(d *decoder, version uint32) error {
	n, m, c := len(s.shape.bounds), s.shape.nObj, s.shape.nCon
	s.started = d.bool()
	s.generation = d.int()
	s.evaluations = d.int()
	s.ref = d.optional(m)

	islands := int(d.u32())
	if d.err == nil && islands != 0 && (islands != s.settings.Islands || !s.started) {
		d.fail("%d islands stored, %d in the settings", islands, s.settings.Islands)
	}
	if d.err == nil && s.started && islands == 0 {
		d.fail("started search without a population")
	}
	s.pops = make([][]record, 0, islands)
	for i := 0; i < islands && d.err == nil; i++ {
		size := int(d.u32())
		if d.err == nil && size != 2*s.settings.PopulationSize {
			d.fail("island %d has %d individuals, want %d", i, size, 2*s.settings.PopulationSize)
		}
		pop := make([]record, 0, size)
		for k := 0; k < size && d.err == nil; k++ {
			g := &genome{env: s.env}
			g.genes, g.obj, g.viol = d.f64s(n), d.f64s(m), d.f64s(c)
			g.total = d.f64()
			g.reason = d.str()
			g.evaluated = d.bool()
			g.fresh = d.bool()
			g.born = d.int()
			fitness := d.f64()
			if d.err == nil && (!g.evaluated || g.born > s.generation) {
				d.fail("island %d individual %d is not a committed individual", i, k)
			}
			pop = append(pop, record{g: g, fitness: fitness})
		}
		s.pops = append(s.pops, pop)
	}

	count := int(d.u32())
	s.front.sols = nil
	for k := 0; k < count && d.err == nil; k++ {
		sol := &Solution{Genes: d.f64s(n), Objectives: d.f64s(m), Violations: d.f64s(c), Feasible: true}
		if d.err == nil && k > 0 && solutionOrder(s.front.sols[k-1], sol) >= 0 {
			d.fail("archive not in order at solution %d", k)
		}
		s.front.sols = append(s.front.sols, sol)
	}
	s.front.closest = nil
	if version >= 2 {
		s.front.closest = readClosest(d, n, m, c)
	}
	if d.err == nil && len(s.front.sols) > 0 && len(s.front.closest) > 0 {
		d.fail("closest points beside a feasible archive")
	}

	count = int(d.u32())
	s.history = nil
	for k := 0; k < count && d.err == nil; k++ {
		p := Progress{Generation: d.int(), Evaluations: d.int(), Hypervolume: d.f64(), Best: d.optional(m)}
		s.history = append(s.history, p)
	}
	if d.err == nil && s.started && len(s.history) != s.generation+1 {
		d.fail("%d history entries for generation %d", len(s.history), s.generation)
	}
	s.polish = nil
	if version == 3 || version >= 4 && d.bool() {
		s.polish = &PolishReport{Points: d.int(), Evaluations: d.int(), Improved: d.int(), Hypervolume: d.f64()}
	}
	if version >= 5 {
		if s.polish == nil {
			d.fail("version 5 without a polish")
			return d.err
		}
		s.polish.Rounds, s.polish.Replaced = d.int(), d.int()
		if d.err == nil && s.polish.Rounds == 0 {
			d.fail("version 5 with no neighbourhood rounds")
		}
	}
	return d.err
}

// readClosest reads the closest part of a checkpoint: infeasible points
// in the archive's order.
func readClosest(d *decoder, n, m, c int) []*Solution {
	var out []*Solution
	count := int(d.u32())
	for k := 0; k < count && d.err == nil; k++ {
		sol := &Solution{Genes: d.f64s(n), Objectives: d.f64s(m), Violations: d.f64s(c)}
		sol.Reason = d.str()
		if d.err == nil && k > 0 && solutionOrder(out[k-1], sol) >= 0 {
			d.fail("closest points not in order at solution %d", k)
		}
		out = append(out, sol)
	}
	return out
}

func sameBits(a, b []float64) bool {
	return (a == nil) == (b == nil) && slices.EqualFunc(a, b, func(x, y float64) bool {
		return math.Float64bits(x) == math.Float64bits(y)
	})
}

// encoder appends checkpoint fields to buf.
type encoder struct{ buf []byte }

func (e *encoder) u32(v uint32) { e.buf = binary.LittleEndian.AppendUint32(e.buf, v) }
func (e *encoder) u64(v uint64) { e.buf = binary.LittleEndian.AppendUint64(e.buf, v) }
func (e *encoder) f64(v float64) {
	e.buf = binary.LittleEndian.AppendUint64(e.buf, math.Float64bits(v))
}
func (e *encoder) bool(v bool) {
	b := byte(0)
	if v {
		b = 1
	}
	e.buf = append(e.buf, b)
}
func (e *encoder) f64s(v []float64) {
	for _, x := range v {
		e.f64(x)
	}
}
func (e *encoder) str(v string) {
	e.u32(uint32(len(v)))
	e.buf = append(e.buf, v...)
}

// optional writes a presence byte and, if v is not nil, its values.
func (e *encoder) optional(v []float64) {
	e.bool(v != nil)
	e.f64s(v)
}

// decoder reads checkpoint fields from buf; the first failure sticks in err
// and makes every later read return zero.
type decoder struct {
	buf []byte
	err error
}

func (d *decoder) fail(format string, args ...any) {
	if d.err == nil {
		d.err = fmt.Errorf("%w: %s", ErrCheckpoint, fmt.Sprintf(format, args...))
	}
}

func (d *decoder) take(n int) []byte {
	if d.err != nil {
		return nil
	}
	if n < 0 || n > len(d.buf) {
		d.fail("truncated")
		return nil
	}
	b := d.buf[:n]
	d.buf = d.buf[n:]
	return b
}

func (d *decoder) u32() uint32 {
	if b := d.take(4); b != nil {
		return binary.LittleEndian.Uint32(b)
	}
	return 0
}

func (d *decoder) u64() uint64 {
	if b := d.take(8); b != nil {
		return binary.LittleEndian.Uint64(b)
	}
	return 0
}

// int reads a u64 that must fit a non-negative int.
func (d *decoder) int() int {
	v := d.u64()
	if v > 1<<48 {
		d.fail("count %d out of range", v)
		return 0
	}
	return int(v)
}

func (d *decoder) f64() float64 { return math.Float64frombits(d.u64()) }

func (d *decoder) bool() bool {
	b := d.take(1)
	if b == nil {
		return false
	}
	if b[0] > 1 {
		d.fail("flag byte %d", b[0])
	}
	return b[0] == 1
}

func (d *decoder) f64s(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = d.f64()
	}
	return v
}

func (d *decoder) str() string {
	n := int(d.u32())
	if n > len(d.buf) {
		d.fail("truncated string")
		return ""
	}
	return string(d.take(n))
}

func (d *decoder) optional(m int) []float64 {
	if !d.bool() {
		return nil
	}
	return d.f64s(m)
}
