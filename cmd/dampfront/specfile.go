package main

import (
	"dampfront/api"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// Input files are YAML or JSON renderings of dampfront.v1 messages: the
// protojson mapping, where the proto field names (sprung_mass_kg) and
// their lowerCamelCase forms are both accepted and enums are written by
// name (OBJECTIVE_KIND_GRIP). They are read by api.DecodeText, so
// anchors and comments may be used and every problem is reported with
// its line and column. "-" reads standard input. Unknown fields are
// errors: a misspelt field would otherwise be silently replaced by its
// default.

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
	return readMessageAt(e, path, m, nil, "")
}

// readMessageAt is readMessage that also records in src (when not nil)
// where the file wrote each field, m being the request's part at prefix.
func readMessageAt(e *env, path string, m proto.Message, src *api.TextSources, prefix string) error {
	b, err := readInput(e, path)
	if err != nil {
		return &inputFileError{path: path, err: err}
	}
	pos, err := api.DecodeTextPositions(b, m)
	if err != nil {
		return &inputFileError{path: path, err: err}
	}
	src.Add(sourceName(path), prefix, pos)
	return nil
}

func decodeMessage(path string, b []byte, m proto.Message) error {
	if err := api.DecodeText(b, m); err != nil {
		return &inputFileError{path: path, err: err}
	}
	return nil
}

// readRoadCases reads a YAML or JSON list of RoadCase messages.
func readRoadCases(e *env, path string) ([]*pb.RoadCase, error) {
	return readRoadCasesAt(e, path, nil, "")
}

func readRoadCasesAt(e *env, path string, src *api.TextSources, prefix string) ([]*pb.RoadCase, error) {
	b, err := readInput(e, path)
	if err != nil {
		return nil, &inputFileError{path: path, err: err}
	}
	out, pos, err := api.DecodeTextList(b, func() *pb.RoadCase { return &pb.RoadCase{} })
	if err != nil {
		return nil, &inputFileError{path: path, err: err}
	}
	if len(out) == 0 {
		return nil, &inputFileError{path: path, err: fmt.Errorf("holds no road case")}
	}
	src.Add(sourceName(path), prefix, pos)
	return out, nil
}

// specFlags read a job spec and optional replacements of its car and road
// cases from separate files.
type specFlags struct {
	vehicle string
	roads   string
	src     api.TextSources // where the files loaded wrote each field
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
		if err := readMessageAt(e, path, spec, &s.src, "spec"); err != nil {
			return nil, err
		}
		if spec.GetDisplayName() == "" && path != "-" {
			spec.DisplayName = filepath.Base(path)
		}
	}
	if s.vehicle != "" {
		v := &pb.Vehicle{}
		if err := readMessageAt(e, s.vehicle, v, &s.src, "spec.vehicle"); err != nil {
			return nil, err
		}
		spec.Vehicle = v
	}
	if s.roads != "" {
		rc, err := readRoadCasesAt(e, s.roads, &s.src, "spec.road_cases")
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
	return readSetupsAt(e, paths, nil, "")
}

// readSetupsAt is readSetups recording in src where each file wrote its
// fields, the setups being the request's list at prefix.
func readSetupsAt(e *env, paths []string, src *api.TextSources, prefix string) ([]*pb.Setup, error) {
	out := make([]*pb.Setup, len(paths))
	for i, p := range paths {
		s := &pb.Setup{}
		if err := readMessageAt(e, p, s, src, fmt.Sprintf("%s[%d]", prefix, i)); err != nil {
			return nil, err
		}
		out[i] = s
	}
	return out, nil
}

// located carries the files a request was built from with the server's
// answer, so that describeError can show each bad field where the user
// wrote it.
type located struct {
	err error
	src api.TextSources
}

func (l *located) Error() string { return l.err.Error() }
func (l *located) Unwrap() error { return l.err }

// locate attaches src to err (nil stays nil).
func locate(err error, src api.TextSources) error {
	if err == nil || len(src) == 0 {
		return err
	}
	return &located{err: err, src: src}
}

// sourceName names an input file in positions: "-" is standard input.
func sourceName(path string) string {
	if path == "-" {
		return "<stdin>"
	}
	return path
}
