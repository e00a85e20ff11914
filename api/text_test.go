package api

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestDecodeTextProblems: every problem of a spec text is reported at
// once, each with the field path and the line and column the user wrote
// (not an offset in a JSON converted from the YAML).
func TestDecodeTextProblems(t *testing.T) {
	t.Parallel()
	type want struct {
		line, column int
		field        string
		reason       string // a part of the reason
	}
	for _, tc := range []struct {
		name string
		text string
		want []want
	}{
		{"every unknown field, at its YAML line", "display_name: x\nvehicle:\n  sprung_mas_kg: 300\n  trak_front_m: 1.5\n  corners: []\nsearch:\n  generation: 3\n",
			[]want{{3, 3, "vehicle.sprung_mas_kg", "did you mean sprung_mass_kg?"}, {4, 3, "vehicle.trak_front_m", "did you mean track_front_m?"},
				{7, 3, "search.generation", "did you mean generations?"}}},
		{"bad enum lists the valid values", "objectives:\n  - kind: GRIP\n",
			[]want{{2, 11, "objectives[0].kind", "valid values: OBJECTIVE_KIND_GRIP, OBJECTIVE_KIND_PLATFORM"}}},
		{"YAML .nan named", "vehicle:\n  sprung_mass_kg: .nan\n  track_front_m: -.inf\n",
			[]want{{2, 19, "vehicle.sprung_mass_kg", "must be a finite number, got .nan"}, {3, 18, "vehicle.track_front_m", "must be a finite number"}}},
		{"JSON NaN string named", `{"vehicle": {"sprungMassKg": "NaN"}}`,
			[]want{{1, 30, "vehicle.sprung_mass_kg", "must be a finite number"}}},
		{"number out of range", "vehicle:\n  sprung_mass_kg: 1e999\n",
			[]want{{2, 19, "vehicle.sprung_mass_kg", "out of range"}}},
		{"JSON duplicate key", "{\"vehicle\": {\"sprung_mass_kg\": 300,\n \"sprungMassKg\": 400}}",
			[]want{{2, 2, "vehicle.sprung_mass_kg", "given twice (first at line 1, column 14)"}}},
		{"YAML duplicate key", "search:\n  seed: 1\n  seed: 2\n",
			[]want{{3, 3, "search.seed", "given twice"}}},
		{"duplicate label key", "labels:\n  car: a\n  car: b\n",
			[]want{{3, 3, `labels["car"]`, "key given twice"}}},
		{"JSON trailing garbage", "{\"display_name\": \"x\"} trailing",
			[]want{{1, 23, "", "text after the end of the JSON document"}}},
		{"truncated JSON", "{\"display_name\": \"x\"",
			[]want{{1, 21, "", "not JSON"}}},
		{"a second YAML document", "display_name: x\n---\ndisplay_name: y\n",
			[]want{{2, 1, "", "a second document"}}},
		{"invalid UTF-8", "display_name: ok\nlabels:\n  car: \"a\xffb\"\n",
			[]want{{3, 10, "", "not valid UTF-8"}}},
		{"two spectra of one road case", "road_cases:\n  - speed_m_per_s: 40\n    iso_class: ISO_CLASS_A\n    power_law: {gd0_m3: 1e-6}\n",
			[]want{{4, 5, "road_cases[0].power_law", "give only one of iso_class, power_law, measured"}}},
		{"integer too large", "search:\n  population_size: 1e12\n",
			[]want{{2, 20, "search.population_size", "must be an integer of 32 bits"}}},
		{"text for a number", "grid:\n  points: many\n",
			[]want{{2, 11, "grid.points", "must be an integer"}}},
		{"mapping for a list", "road_cases:\n  speed_m_per_s: 40\n",
			[]want{{2, 3, "road_cases", "must be a list"}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			err := DecodeText([]byte(tc.text), &pb.JobSpec{})
			var te *TextError
			if !errors.As(err, &te) {
				t.Fatalf("DecodeText: %v (%T), want a *TextError", err, err)
			}
			if len(te.Problems) != len(tc.want) {
				t.Fatalf("%d problems, want %d:\n%v", len(te.Problems), len(tc.want), err)
			}
			for i, w := range tc.want {
				got := te.Problems[i]
				if got.Line != w.line || got.Column != w.column || got.Field != w.field || !strings.Contains(got.Reason, w.reason) {
					t.Errorf("problem %d: %s\nwant line %d, column %d: %s: ...%s...", i, got, w.line, w.column, w.field, w.reason)
				}
			}
		})
	}
}

// TestDecodeTextValid: anchors, aliases and merge keys decode as their
// expansion, JSON and proto field names both work, and the positions of
// the written fields are kept.
func TestDecodeTextValid(t *testing.T) {
	t.Parallel()
	text := `# a comment
display_name: merged
labels: {car: a}
road_cases:
  - &smooth {name: smooth, speed_m_per_s: 40, iso_class: ISO_CLASS_A}
  - <<: *smooth
    name: rough
    speedMPerS: 50
search: {seed: 0x10, population_size: 48.0}
`
	got := &pb.JobSpec{}
	pos, err := DecodeTextPositions([]byte(text), got)
	if err != nil {
		t.Fatal(err)
	}
	want := &pb.JobSpec{
		DisplayName: "merged", Labels: map[string]string{"car": "a"},
		RoadCases: []*pb.RoadCase{
			{Name: "smooth", SpeedMPerS: 40, Spectrum: &pb.RoadCase_IsoClass{IsoClass: pb.IsoClass_ISO_CLASS_A}},
			{Name: "rough", SpeedMPerS: 50, Spectrum: &pb.RoadCase_IsoClass{IsoClass: pb.IsoClass_ISO_CLASS_A}},
		},
		Search: &pb.SearchSettings{Seed: proto.Uint64(16), PopulationSize: 48},
	}
	if !proto.Equal(got, want) {
		t.Errorf("decoded %v\nwant %v", got, want)
	}
	for path, w := range map[string]TextPosition{
		"road_cases[1].speed_m_per_s": {8, 17},
		"road_cases[0].name":          {5, 20},
		"vehicle.sprung_mass_kg":      {2, 1}, // not written: the document, after the comment
		"search.population_size":      {9, 39},
	} {
		if at, ok := pos.Of(path); !ok || at != w {
			t.Errorf("position of %s = %v, %v; want %v", path, at, ok, w)
		}
	}
}

// TestDecodeTextRepositorySpecs: every spec of the repository's testdata
// that decoded before decodes now (the misspelt and broken ones do not).
func TestDecodeTextRepositorySpecs(t *testing.T) {
	t.Parallel()
	for name, ok := range map[string]bool{"demo-job.yaml": true, "bad/five-bad-fields.yaml": true, "bad/too-large.yaml": true,
		"bad/misspelt-field.yaml": false, "bad/not-yaml.yaml": false} {
		b, err := os.ReadFile(filepath.Join("..", "testdata", name))
		if err != nil {
			t.Fatal(err)
		}
		if err := DecodeText(b, &pb.JobSpec{}); (err == nil) != ok {
			t.Errorf("%s: DecodeText: %v, want success %v", name, err, ok)
		}
	}
}
