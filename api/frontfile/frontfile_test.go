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
