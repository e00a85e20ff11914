package frontfile

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// TestReadmeDocumentsEveryColumn holds the README's section "The front as
// a file" to the writer: every column that a front of every gene,
// objective and constraint kind gets must be listed there with a unit.
func TestReadmeDocumentsEveryColumn(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	text := string(b)
	start := strings.Index(text, "### The front as a file")
	if start < 0 {
		t.Fatal(`README.md has no section "### The front as a file"`)
	}
	section := text[start:]
	if end := strings.Index(section[4:], "\n### "); end >= 0 {
		section = section[:end+4]
	}
	// A documented column is a `name` in the first cell of a table row
	// whose second cell (the unit) is not empty.
	documented := map[string]bool{}
	row := regexp.MustCompile("(?m)^\\| ([^|]+) \\| ([^|]+) \\|")
	for _, m := range row.FindAllStringSubmatch(section, -1) {
		if strings.TrimSpace(m[2]) == "" {
			continue
		}
		for _, c := range regexp.MustCompile("`([a-z0-9_]+)`").FindAllStringSubmatch(m[1], -1) {
			documented[c[1]] = true
		}
	}

	var genes []string
	r := model.Range{Min: 0.1, Max: 1}
	for _, d := range []model.DesignSpace{{Knee: [2]*model.Range{&r, &r}, HighSpeed: [2]*model.Range{&r, &r}}, {Symmetric: true}} {
		for _, g := range d.Genes() {
			genes = append(genes, g.Name)
		}
	}
	f := &pb.Front{GeneNames: genes}
	for k := range pb.ObjectiveKind_name {
		if k != 0 {
			f.Objectives = append(f.Objectives, &pb.Objective{Kind: pb.ObjectiveKind(k)})
		}
	}
	for k := range pb.ConstraintKind_name {
		if k != 0 {
			f.Constraints = append(f.Constraints, &pb.Constraint{Kind: pb.ConstraintKind(k), Limit: 1})
		}
	}
	for _, c := range Columns(f) {
		if !documented[c] {
			t.Errorf("column %s is not documented in README.md's \"The front as a file\"", c)
		}
	}
}

// TestRobustColumns: a robust front (a solution carries Solution.robust)
// gets each objective's nominal, sd and worst after the other columns, in
// that order; a front without them keeps its columns as before.
func TestRobustColumns(t *testing.T) {
	t.Parallel()
	f := &pb.Front{GeneNames: []string{"front_ratio", "rear_ratio"},
		Objectives: []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM}},
		Solutions:  []*pb.Solution{{Genes: []float64{0.5, 0.6}, Objectives: []float64{0.08, 0.002}}}}
	plain := Columns(f)
	if Robust(f) || strings.Contains(strings.Join(plain, ","), "_nominal") {
		t.Fatalf("a front without robust figures got robust columns: %v", plain)
	}
	f.Solutions[0].Robust = &pb.RobustObjectives{Nominal: []float64{0.07, 0.0019}, Mean: []float64{0.075, 0.00195},
		Sd: []float64{0.003, 0.00004}, Worst: []float64{0.082, 0.0021}}
	cols := Columns(f)
	wantCols := []string{"grip_rel_nominal", "grip_rel_sd", "grip_rel_worst", "platform_m_nominal", "platform_m_sd", "platform_m_worst"}
	if got := cols[len(plain):]; strings.Join(got, ",") != strings.Join(wantCols, ",") || strings.Join(cols[:len(plain)], ",") != strings.Join(plain, ",") {
		t.Fatalf("columns %v, want %v then %v", cols, plain, wantCols)
	}
	var b strings.Builder
	if err := WriteCSV(&b, f); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")
	if len(lines) != 2 || !strings.HasSuffix(lines[1], ",0.07,0.003,0.082,0.0019,4e-05,0.0021") {
		t.Errorf("CSV %q does not end with nominal, sd, worst per objective", b.String())
	}
}
