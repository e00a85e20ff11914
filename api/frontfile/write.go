package frontfile

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// WriteCSV writes the front as CSV: a header of Columns, then one row per
// solution in the front's order; a missing slope is an empty cell.
func WriteCSV(w io.Writer, f *pb.Front) error {
	cols := Columns(f)
	cw := csv.NewWriter(w)
	if err := cw.Write(cols); err != nil {
		return err
	}
	bal := Balanced(f)
	for i, s := range f.GetSolutions() {
		values := row(f, s, i == bal)
		if len(values) != len(cols) {
			return fmt.Errorf("solution %d has %d values for %d columns", s.GetIndex(), len(values), len(cols))
		}
		cells := make([]string, len(values))
		for k, v := range values {
			switch v := v.(type) {
			case nil:
			case float64:
				cells[k] = Number(v)
			case int:
				cells[k] = strconv.Itoa(v)
			case bool:
				cells[k] = strconv.FormatBool(v)
			}
		}
		if err := cw.Write(cells); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteJSON writes the front as one JSON object of the job's header
// (job, display_name, state, seed, partial, total_size, gene_names,
// objectives, constraints, balanced_index) and its solutions, each an
// object with the keys of Columns (null for a missing slope) and, when it
// has any, "warnings". job carries the display name, state and seed.
func WriteJSON(w io.Writer, job *pb.Job, f *pb.Front) error {
	cols := Columns(f)
	bal := Balanced(f)
	rows := make([]record, len(f.GetSolutions()))
	for i, s := range f.GetSolutions() {
		r := record{keys: cols, values: row(f, s, i == bal)}
		if ws := s.GetWarnings(); len(ws) > 0 {
			r.keys = append(append([]string(nil), cols...), "warnings")
			r.values = append(r.values, ws)
		}
		rows[i] = r
	}
	objs := []record{}
	for k, o := range f.GetObjectives() {
		r := record{keys: []string{"column", "kind", "aggregation"},
			values: []any{ObjectiveColumn(o.GetKind()), o.GetKind().String(), o.GetAggregation().String()}}
		if src := refinedSource(f, k); src != "" {
			r.keys, r.values = append(r.keys, "refined_source"), append(r.values, src)
		}
		objs = append(objs, r)
	}
	cons := []record{}
	for _, c := range f.GetConstraints() {
		cons = append(cons, record{keys: []string{"column", "kind", "limit"},
			values: []any{ConstraintColumn(c), c.GetKind().String(), c.GetLimit()}})
	}
	balIndex := -1
	if bal >= 0 {
		balIndex = int(f.GetSolutions()[bal].GetIndex())
	}
	genes := f.GetGeneNames()
	if genes == nil {
		genes = []string{}
	}
	out := record{
		keys: []string{"job", "display_name", "state", "seed", "partial", "total_size", "gene_names", "objectives", "constraints", "balanced_index", "solutions"},
		values: []any{f.GetJob(), job.GetDisplayName(), StateName(job.GetState()), job.GetSeed(), f.GetPartial(), int(f.GetTotalSize()),
			genes, objs, cons, balIndex, rows},
	}
	b, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// refinedSource names where objective k's refined value comes from
// ("time_domain", "linear", "transient"), the same for every point; ""
// for a front without refined figures.
func refinedSource(f *pb.Front, k int) string {
	if !Refined(f) {
		return ""
	}
	for _, s := range f.GetSolutions() {
		if src := s.GetRefined().GetObjectiveSources(); k < len(src) {
			return strings.ToLower(strings.TrimPrefix(src[k].String(), "REFINE_SOURCE_"))
		}
	}
	return ""
}

// StateName is a job state as the files and tables write it: "succeeded".
func StateName(s pb.JobState) string {
	return strings.ToLower(strings.TrimPrefix(s.String(), "JOB_STATE_"))
}

// record is a JSON object whose keys keep their order.
type record struct {
	keys   []string
	values []any
}

func (r record) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range r.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		kb, _ := json.Marshal(k)
		vb, err := json.Marshal(r.values[i])
		if err != nil {
			return nil, fmt.Errorf("field %s: %w", k, err)
		}
		b.Write(kb)
		b.WriteByte(':')
		b.Write(vb)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}
