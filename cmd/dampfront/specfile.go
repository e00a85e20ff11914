package main

import (
	"dampfront/api"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"
	"sigs.k8s.io/yaml"

	pb "dampfront/api/gen/dampfront/v1"
)

// Input files are YAML or JSON renderings of dampfront.v1 messages: the
// protojson mapping, where the proto field names (sprung_mass_kg) and
// their lowerCamelCase forms are both accepted and enums are written by
// name (OBJECTIVE_KIND_GRIP). YAML is turned into JSON first
// (sigs.k8s.io/yaml), so anchors and comments may be used. "-" reads
// standard input. Unknown fields are errors: a misspelt field would
// otherwise be silently replaced by its default.

// readInput reads a file, or standard input for "-".
func readInput(e *env, path string) ([]byte, error) {
	if path == "-" {
		return io.ReadAll(e.stdin)
	}
	return os.ReadFile(path)
}

// inputFileError is an unreadable or malformed input file: exit code 2.
type inputFileError struct {
	path string
	err  error
}

func (e *inputFileError) Error() string { return fmt.Sprintf("%s: %v", e.path, e.err) }
func (e *inputFileError) Unwrap() error { return e.err }

// readMessage fills m from the YAML or JSON file at path.
func readMessage(e *env, path string, m proto.Message) error {
	b, err := readInput(e, path)
	if err != nil {
		return &inputFileError{path: path, err: err}
	}
	return decodeMessage(path, b, m)
}

func decodeMessage(path string, b []byte, m proto.Message) error {
	if err := api.DecodeText(b, m); err != nil {
		return &inputFileError{path: path, err: err}
	}
	return nil
}

// readRoadCases reads a YAML or JSON list of RoadCase messages.
func readRoadCases(e *env, path string) ([]*pb.RoadCase, error) {
	b, err := readInput(e, path)
	if err != nil {
		return nil, &inputFileError{path: path, err: err}
	}
	j, err := yaml.YAMLToJSON(b)
	if err != nil {
		return nil, &inputFileError{path: path, err: fmt.Errorf("not YAML or JSON: %w", err)}
	}
	var items []json.RawMessage
	if err := json.Unmarshal(j, &items); err != nil {
		return nil, &inputFileError{path: path, err: fmt.Errorf("not a list of road cases: %w", err)}
	}
	if len(items) == 0 {
		return nil, &inputFileError{path: path, err: fmt.Errorf("holds no road case")}
	}
	out := make([]*pb.RoadCase, len(items))
	for i, it := range items {
		rc := &pb.RoadCase{}
		if err := protojson.Unmarshal(it, rc); err != nil {
			return nil, &inputFileError{path: path, err: fmt.Errorf("road case %d: %w", i, err)}
		}
		out[i] = rc
	}
	return out, nil
}

// specFlags read a job spec and optional replacements of its car and road
// cases from separate files.
type specFlags struct {
	vehicle string
	roads   string
}

func addSpecFlags(fs *flagSet) *specFlags {
	s := &specFlags{}
	fs.StringVar(&s.vehicle, "vehicle", "", "replace the spec's car with the Vehicle in this YAML/JSON `file`")
	fs.StringVar(&s.roads, "roads", "", "replace the spec's road cases with the list in this YAML/JSON `file`")
	return s
}

// load reads the spec at path (which may be empty when both replacement
// files are given) and applies the replacements.
func (s *specFlags) load(e *env, path string) (*pb.JobSpec, error) {
	spec := &pb.JobSpec{}
	if path != "" {
		if err := readMessage(e, path, spec); err != nil {
			return nil, err
		}
		if spec.GetDisplayName() == "" && path != "-" {
			spec.DisplayName = filepath.Base(path)
		}
	}
	if s.vehicle != "" {
		v := &pb.Vehicle{}
		if err := readMessage(e, s.vehicle, v); err != nil {
			return nil, err
		}
		spec.Vehicle = v
	}
	if s.roads != "" {
		rc, err := readRoadCases(e, s.roads)
		if err != nil {
			return nil, err
		}
		spec.RoadCases = rc
	}
	return spec, nil
}

// replaceParts sets on spec the car and road cases that over (a load of
// the replacement files alone) holds, and returns spec.
func replaceParts(spec, over *pb.JobSpec) *pb.JobSpec {
	if over.Vehicle != nil {
		spec.Vehicle = over.Vehicle
	}
	if over.RoadCases != nil {
		spec.RoadCases = over.RoadCases
	}
	return spec
}

// readSetups reads one Setup message per file.
func readSetups(e *env, paths []string) ([]*pb.Setup, error) {
	out := make([]*pb.Setup, len(paths))
	for i, p := range paths {
		s := &pb.Setup{}
		if err := readMessage(e, p, s); err != nil {
			return nil, err
		}
		out[i] = s
	}
	return out, nil
}
