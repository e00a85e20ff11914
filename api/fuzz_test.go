package api

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"google.golang.org/genproto/googleapis/rpc/errdetails"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/status"
	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/jobs/study"
)

// The fuzz targets of spec input. Their property, from issue 6 and
// compile's doc comment: any input gives a clear error — InvalidArgument
// with a field violation naming a field under "spec" and saying what is
// wrong, or a decoding error with a message — or a valid job, and a
// valid job re-validates where the engine checks it again (the stored,
// defaulted bytes through validateSpecBytes). Never a panic.
//
//	go test -run '^$' -fuzz '^FuzzCompileSpecText$' -fuzztime 60s ./api/
//	go test -run '^$' -fuzz '^FuzzValidateSpecBytes$' -fuzztime 60s ./api/
//
// Seed corpora: testdata/fuzz/FuzzCompileSpecText (the demo job in YAML
// and JSON, the spec fixture of these tests, testdata/bad's specs, and
// broken YAML) and testdata/fuzz/FuzzValidateSpecBytes (the same specs
// in the protobuf encoding the engine stores, truncated and altered
// ones); f.Add adds the repository's testdata specs as they are now.

// fuzzMaxSpecBytes skips inputs over the engine's default spec limit
// (jobs.DefaultMaxSpecBytes), which nothing larger gets past.
const fuzzMaxSpecBytes = jobs.DefaultMaxSpecBytes

// decodeSpecText decodes a YAML or JSON job spec as the dampfront
// command does (DecodeText).
func decodeSpecText(b []byte) (*pb.JobSpec, error) {
	spec := &pb.JobSpec{}
	if err := DecodeText(b, spec); err != nil {
		return nil, err
	}
	return spec, nil
}

// addRepositorySpecs adds the job specs of the repository's testdata
// (in the given encoding) as seeds.
func addRepositorySpecs(f *testing.F, encode func(*pb.JobSpec, []byte) []byte) {
	f.Helper()
	for _, name := range []string{"demo-job.yaml", "bad/five-bad-fields.yaml", "bad/too-large.yaml", "bad/misspelt-field.yaml", "bad/not-yaml.yaml"} {
		text, err := os.ReadFile(filepath.Join("..", "testdata", name))
		if err != nil {
			f.Fatal(err)
		}
		spec, err := decodeSpecText(text)
		if err != nil {
			spec = nil // the broken ones go in as text only
		}
		if b := encode(spec, text); b != nil {
			f.Add(b)
		}
	}
	if b := encode(testSpec(3), nil); b != nil {
		f.Add(b)
	}
}

func FuzzCompileSpecText(f *testing.F) {
	addRepositorySpecs(f, func(spec *pb.JobSpec, text []byte) []byte {
		if text != nil {
			return text
		}
		b, err := protojson.Marshal(spec)
		if err != nil {
			f.Fatal(err)
		}
		return b
	})
	f.Fuzz(func(t *testing.T, text []byte) {
		if len(text) > fuzzMaxSpecBytes {
			t.Skip("over the spec size limit")
		}
		spec, err := decodeSpecText(text)
		if err != nil {
			if strings.TrimSpace(err.Error()) == "" {
				t.Fatalf("decoding error %T without a message", err)
			}
			return
		}
		checkCompiledSpec(t, spec)
	})
}

func FuzzValidateSpecBytes(f *testing.F) {
	addRepositorySpecs(f, func(spec *pb.JobSpec, _ []byte) []byte {
		if spec == nil {
			return nil
		}
		b, err := MarshalSpec(spec)
		if err != nil {
			f.Fatal(err)
		}
		return b
	})
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > fuzzMaxSpecBytes {
			t.Skip("over the spec size limit")
		}
		o := NewOpener(1)
		err := validateSpecBytes(b)
		if err != nil {
			checkSpecInvalidArgument(t, err)
			return
		}
		spec := new(pb.JobSpec)
		if err := proto.Unmarshal(b, spec); err != nil {
			t.Fatalf("validateSpecBytes accepted bytes that do not decode: %v", err)
		}
		checkCompiledSpec(t, spec)
		// The engine opens what the server accepts.
		if _, err := o.Open(b, nil); err != nil {
			t.Fatalf("Open of a spec validateSpecBytes accepted: %v", err)
		}
	})
}

// checkCompiledSpec compiles spec and fails t unless the result is a
// clear InvalidArgument or a valid plan that re-validates.
func checkCompiledSpec(t *testing.T, spec *pb.JobSpec) {
	t.Helper()
	pl, err := compileSpec(spec)
	if err != nil {
		checkSpecInvalidArgument(t, err)
		if verr := validateSpecBytes(mustMarshal(t, spec)); verr == nil {
			t.Fatalf("compile refused the spec (%v), validateSpecBytes accepts it", err)
		}
		return
	}
	if w := pl.size.Work; w <= 0 {
		t.Fatalf("a valid plan of work %d", w)
	}
	stored, err := MarshalSpec(pl.msg)
	if err != nil {
		t.Fatalf("MarshalSpec of a valid spec: %v", err)
	}
	// withDefaults is idempotent (its doc comment): the defaulted spec
	// stores as the same bytes as the spec itself.
	if direct, err := MarshalSpec(spec); err != nil || !bytes.Equal(direct, stored) {
		t.Fatalf("MarshalSpec(spec) and MarshalSpec(withDefaults(spec)) differ (err %v)", err)
	}
	if err := validateSpecBytes(stored); err != nil {
		t.Fatalf("a compiled spec does not re-validate from its stored bytes: %v", err)
	}
}

func mustMarshal(t *testing.T, m proto.Message) []byte {
	t.Helper()
	b, err := proto.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// checkSpecInvalidArgument fails t unless err is an InvalidArgument
// status whose BadRequest names, for every violation, a field under
// "spec" and a reason (AIP-193).
func checkSpecInvalidArgument(t *testing.T, err error) {
	t.Helper()
	st, ok := status.FromError(err)
	if !ok || st.Code() != codes.InvalidArgument {
		t.Fatalf("compile error is not InvalidArgument: %v", err)
	}
	var n int
	for _, d := range st.Details() {
		br, ok := d.(*errdetails.BadRequest)
		if !ok {
			continue
		}
		for _, v := range br.GetFieldViolations() {
			n++
			checkViolation(t, v.GetField(), v.GetDescription())
		}
	}
	if n == 0 {
		t.Fatalf("InvalidArgument without field violations: %v", err)
	}
}

// compiledSpec is a spec compiled as the server does, with its size.
type compiledSpec struct {
	*specPlan
	size study.Size
}

// compileSpec converts, checks and compiles spec as the server does;
// problems are an InvalidArgument status.
func compileSpec(spec *pb.JobSpec) (*compiledSpec, error) {
	var p problems
	c, err := checkSpec(spec, "spec.", &p)
	if err != nil {
		return nil, err
	}
	pl, err := compileChecked(context.Background(), c)
	if err != nil {
		return nil, err
	}
	return &compiledSpec{specPlan: pl, size: c.Size()}, nil
}

// validateSpecBytes does with spec bytes what the server does with a
// stored spec before it runs: decode, check and compile. Problems are an
// InvalidArgument status under "spec".
func validateSpecBytes(b []byte) error {
	spec, err := unmarshalSpec(b)
	if err != nil {
		return invalidArgument(problems{{Field: "spec", Reason: err.Error()}})
	}
	_, err = compileSpec(spec)
	return err
}

func checkViolation(t *testing.T, field, reason string) {
	t.Helper()
	if field != "spec" && !strings.HasPrefix(field, "spec.") {
		t.Fatalf("violation of field %q, not under spec: %s", field, reason)
	}
	if strings.TrimSpace(reason) == "" {
		t.Fatalf("violation of %s without a reason", field)
	}
}
