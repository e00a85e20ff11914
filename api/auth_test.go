package api

import (
	"context"
	"fmt"
	"io"
	"math/rand/v2"
	"strings"
	"testing"

	"google.golang.org/grpc/codes"
	healthpb "google.golang.org/grpc/health/grpc_health_v1"
	"google.golang.org/grpc/metadata"
	reflectionpb "google.golang.org/grpc/reflection/grpc_reflection_v1"
	"google.golang.org/grpc/status"

	pb "dampfront/api/gen/dampfront/v1"
)

// The constant-time comparison of tokens is checked by reading
// Tokens.lookup (crypto/subtle over every entry, no early exit), not by
// timing it: the rules of the tests forbid timing assertions.

// testTokens makes one token per name and role from a seeded source and
// returns the set and the secrets by name.
func testTokens(t *testing.T, seed uint64, roles map[string]Role) (*Tokens, map[string]string) {
	t.Helper()
	random := rand.NewChaCha8([32]byte{byte(seed)})
	secrets := map[string]string{}
	var file strings.Builder
	for name, role := range roles {
		tok, err := NewToken(random)
		if err != nil {
			t.Fatal(err)
		}
		secrets[name] = tok
		fmt.Fprintf(&file, "- {name: %q, role: %q, sha256: %q}\n", name, role, HashToken(tok))
	}
	toks, err := ParseTokens([]byte(file.String()))
	if err != nil {
		t.Fatalf("ParseTokens:\n%s\n%v", file.String(), err)
	}
	return toks, secrets
}

// as is a test context whose calls present token as a bearer token.
func as(t *testing.T, token string) context.Context {
	t.Helper()
	return metadata.AppendToOutgoingContext(testContext(t), "authorization", "Bearer "+token)
}

// authRoles are the tokens of the authorisation tests.
var authRoles = map[string]Role{"viewer": RoleReader, "ci-a": RoleSubmitter, "ci-b": RoleSubmitter, "boss": RoleAdmin}

// TestRoleOfEveryMethod: every call of DampfrontService has a role in
// methodRoles, so none falls to the admin-only default by oversight.
func TestRoleOfEveryMethod(t *testing.T) {
	t.Parallel()
	sd := pb.DampfrontService_ServiceDesc
	var methods []string
	for _, m := range sd.Methods {
		methods = append(methods, m.MethodName)
	}
	for _, s := range sd.Streams {
		methods = append(methods, s.StreamName)
	}
	for _, m := range methods {
		if _, ok := methodRoles["/"+sd.ServiceName+"/"+m]; !ok {
			t.Errorf("%s has no role in methodRoles", m)
		}
	}
	if len(methodRoles) != len(methods) {
		t.Errorf("methodRoles has %d entries, the service %d methods", len(methodRoles), len(methods))
	}
}

// TestAuthMatrix calls every RPC with an empty request under each kind of
// caller. A refused call is Unauthenticated (no token, an unknown or a
// malformed one) or PermissionDenied (a role too low), the split of
// gRPC's status code documentation (grpc/doc/statuscodes.md); an allowed
// call reaches its handler, which refuses the empty request with
// InvalidArgument (ListJobs accepts it). The roles expected are those of
// the service's role table (Role's doc).
func TestAuthMatrix(t *testing.T) {
	t.Parallel()
	toks, secrets := testTokens(t, 1, authRoles)
	// Slots for every parallel subtest's synchronous call, so that none
	// is turned away as busy.
	b := setup(t, Options{Tokens: toks, MaxConcurrentEvaluations: 256})

	calls := []struct {
		name    string
		need    Role
		passed  codes.Code // the handler's answer to the empty request
		callRPC func(ctx context.Context, c pb.DampfrontServiceClient) error
	}{
		{"GetJob", RoleReader, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.GetJob(ctx, &pb.GetJobRequest{})
			return err
		}},
		{"ListJobs", RoleReader, codes.OK, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.ListJobs(ctx, &pb.ListJobsRequest{})
			return err
		}},
		{"WatchJob", RoleReader, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			st, err := c.WatchJob(ctx, &pb.WatchJobRequest{})
			if err != nil {
				return err
			}
			_, err = st.Recv()
			return err
		}},
		{"GetFront", RoleReader, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.GetFront(ctx, &pb.GetFrontRequest{})
			return err
		}},
		{"EstimateByHand", RoleReader, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.EstimateByHand(ctx, &pb.EstimateByHandRequest{})
			return err
		}},
		{"SubmitJob", RoleSubmitter, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.SubmitJob(ctx, &pb.SubmitJobRequest{})
			return err
		}},
		{"EvaluateSetups", RoleSubmitter, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{})
			return err
		}},
		{"CompareSetup", RoleSubmitter, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.CompareSetup(ctx, &pb.CompareSetupRequest{})
			return err
		}},
		{"GetDamperCurves", RoleSubmitter, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.GetDamperCurves(ctx, &pb.GetDamperCurvesRequest{})
			return err
		}},
		{"VerifySetup", RoleSubmitter, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.VerifySetup(ctx, &pb.VerifySetupRequest{})
			return err
		}},
		{"CancelJob", RoleSubmitter, codes.InvalidArgument, func(ctx context.Context, c pb.DampfrontServiceClient) error {
			_, err := c.CancelJob(ctx, &pb.CancelJobRequest{})
			return err
		}},
	}
	callers := []struct {
		name   string
		ctx    func(t *testing.T) context.Context
		role   Role // 0: not authenticated
		reason string
	}{
		{"no token", testContext, 0, ReasonUnauthenticated},
		{"unknown token", func(t *testing.T) context.Context { return as(t, strings.Repeat("x", 47)) }, 0, ReasonUnauthenticated},
		{"token of another set", func(t *testing.T) context.Context {
			_, other := testTokens(t, 2, map[string]Role{"boss": RoleAdmin})
			return as(t, other["boss"])
		}, 0, ReasonUnauthenticated},
		{"basic scheme", func(t *testing.T) context.Context {
			return metadata.AppendToOutgoingContext(testContext(t), "authorization", "Basic "+secrets["boss"])
		}, 0, ReasonUnauthenticated},
		{"scheme without token", func(t *testing.T) context.Context {
			return metadata.AppendToOutgoingContext(testContext(t), "authorization", "Bearer ")
		}, 0, ReasonUnauthenticated},
		{"two values", func(t *testing.T) context.Context {
			return metadata.AppendToOutgoingContext(as(t, secrets["boss"]), "authorization", "Bearer "+secrets["viewer"])
		}, 0, ReasonUnauthenticated},
		{"reader", func(t *testing.T) context.Context { return as(t, secrets["viewer"]) }, RoleReader, ReasonRoleNotAllowed},
		{"submitter", func(t *testing.T) context.Context { return as(t, secrets["ci-a"]) }, RoleSubmitter, ReasonRoleNotAllowed},
		{"admin", func(t *testing.T) context.Context { return as(t, secrets["boss"]) }, RoleAdmin, ""},
		// RFC 7235 section 2.1: the scheme is case-insensitive.
		{"lower-case scheme", func(t *testing.T) context.Context {
			return metadata.AppendToOutgoingContext(testContext(t), "authorization", "bearer "+secrets["boss"])
		}, RoleAdmin, ""},
	}
	for _, cl := range callers {
		for _, call := range calls {
			t.Run(cl.name+"/"+call.name, func(t *testing.T) {
				t.Parallel()
				err := call.callRPC(cl.ctx(t), b.client)
				switch {
				case cl.role == 0:
					wantCode(t, call.name, err, codes.Unauthenticated, cl.reason)
				case cl.role < call.need:
					wantCode(t, call.name, err, codes.PermissionDenied, cl.reason)
				case status.Code(err) != call.passed:
					t.Errorf("%s as %s: %v, want the handler's %v", call.name, cl.name, err, call.passed)
				}
			})
		}
	}
}

// TestAuthOpenServices: health and reflection answer without a token on
// a server that requires one for everything else.
func TestAuthOpenServices(t *testing.T) {
	t.Parallel()
	toks, _ := testTokens(t, 3, map[string]Role{"boss": RoleAdmin})
	b := setup(t, Options{Tokens: toks})
	ctx := testContext(t)
	res, err := healthpb.NewHealthClient(b.conn).Check(ctx, &healthpb.HealthCheckRequest{})
	if err != nil || res.GetStatus() != healthpb.HealthCheckResponse_SERVING {
		t.Errorf("health without a token: %v, %v", res, err)
	}
	rs, err := reflectionpb.NewServerReflectionClient(b.conn).ServerReflectionInfo(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if err := rs.Send(&reflectionpb.ServerReflectionRequest{MessageRequest: &reflectionpb.ServerReflectionRequest_ListServices{}}); err != nil {
		t.Fatal(err)
	}
	if r, err := rs.Recv(); err != nil || len(r.GetListServicesResponse().GetService()) == 0 {
		t.Errorf("reflection without a token: %v, %v", r, err)
	}
	_ = rs.CloseSend()
	_, err = b.client.ListJobs(ctx, &pb.ListJobsRequest{})
	wantCode(t, "ListJobs without a token", err, codes.Unauthenticated, ReasonUnauthenticated)
}

// TestCancelOwnJobs: a job is labelled with the submitting token's name;
// another submitter cannot cancel it, nor can a reader; its owner and an
// admin can.
func TestCancelOwnJobs(t *testing.T) {
	t.Parallel()
	toks, secrets := testTokens(t, 4, authRoles)
	b := setup(t, Options{Tokens: toks})
	long := testSpec(5000) // far longer than the test; cancelled below

	res, err := b.client.SubmitJob(as(t, secrets["ci-a"]), &pb.SubmitJobRequest{Spec: long})
	if err != nil {
		t.Fatal(err)
	}
	job := res.GetJob()
	if got := job.GetLabels()[OwnerLabel]; got != "ci-a" {
		t.Errorf("owner label %q, want ci-a; labels %v", got, job.GetLabels())
	}
	if job.GetLabels()["suite"] != "api" {
		t.Errorf("the spec's own labels were lost: %v", job.GetLabels())
	}
	got, err := b.client.GetJob(as(t, secrets["viewer"]), &pb.GetJobRequest{Name: job.GetName()})
	if err != nil || got.GetJob().GetLabels()[OwnerLabel] != "ci-a" {
		t.Errorf("GetJob by a reader: %v, %v", got, err)
	}
	list, err := b.client.ListJobs(as(t, secrets["viewer"]), &pb.ListJobsRequest{Labels: map[string]string{OwnerLabel: "ci-a"}})
	if err != nil || len(list.GetJobs()) != 1 {
		t.Errorf("ListJobs by owner label: %v, %v", list, err)
	}

	_, err = b.client.CancelJob(as(t, secrets["ci-b"]), &pb.CancelJobRequest{Name: job.GetName()})
	wantCode(t, "CancelJob by another submitter", err, codes.PermissionDenied, ReasonNotJobOwner)
	_, err = b.client.CancelJob(as(t, secrets["viewer"]), &pb.CancelJobRequest{Name: job.GetName()})
	wantCode(t, "CancelJob by a reader", err, codes.PermissionDenied, ReasonRoleNotAllowed)
	_, err = b.client.CancelJob(as(t, secrets["ci-b"]), &pb.CancelJobRequest{Name: "jobs/no-such-job"})
	wantCode(t, "CancelJob of an unknown job", err, codes.NotFound, ReasonJobNotFound)
	if j, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: job.GetName()}); err == nil {
		t.Errorf("GetJob without a token answered %v", j)
	}
	got, err = b.client.GetJob(as(t, secrets["viewer"]), &pb.GetJobRequest{Name: job.GetName()})
	if err != nil || got.GetJob().GetCancelRequested() {
		t.Fatalf("after the refused cancels: %v, %v", got, err)
	}

	if _, err := b.client.CancelJob(as(t, secrets["boss"]), &pb.CancelJobRequest{Name: job.GetName()}); err != nil {
		t.Errorf("CancelJob by an admin: %v", err)
	}
	res, err = b.client.SubmitJob(as(t, secrets["ci-b"]), &pb.SubmitJobRequest{Spec: long})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := b.client.CancelJob(as(t, secrets["ci-b"]), &pb.CancelJobRequest{Name: res.GetJob().GetName()}); err != nil {
		t.Errorf("CancelJob by its owner: %v", err)
	}
	for _, name := range []string{job.GetName(), res.GetJob().GetName()} {
		got, err := b.client.GetJob(as(t, secrets["viewer"]), &pb.GetJobRequest{Name: name})
		if err != nil || !got.GetJob().GetCancelRequested() {
			t.Errorf("%s after its cancel: %v, %v", name, got, err)
		}
	}
}

// TestReservedLabels: a spec may not set a label the server reserves,
// with authentication or without, so no job claims an owner.
func TestReservedLabels(t *testing.T) {
	t.Parallel()
	toks, secrets := testTokens(t, 5, map[string]Role{"boss": RoleAdmin})
	withAuth := setup(t, Options{Tokens: toks})
	without := setup(t, Options{})
	for _, key := range []string{OwnerLabel, ReservedLabelPrefix + "anything"} {
		for _, tt := range []struct {
			name string
			b    *testBundle
			ctx  context.Context
		}{
			{"with tokens", withAuth, as(t, secrets["boss"])},
			{"without", without, testContext(t)},
		} {
			spec := testSpec(4)
			spec.Labels[key] = "someone"
			_, err := tt.b.client.SubmitJob(tt.ctx, &pb.SubmitJobRequest{Spec: spec})
			paths := violations(t, tt.name+" "+key, err)
			want := fmt.Sprintf("spec.labels[%q]", key)
			if len(paths) != 1 || paths[0] != want {
				t.Errorf("%s %s: violations %v, want [%s]", tt.name, key, paths, want)
			}
		}
	}
	// Without tokens a job has no owner.
	job := without.submit(t, testSpec(2))
	if owner, ok := job.GetLabels()[OwnerLabel]; ok {
		t.Errorf("unauthenticated job has owner %q", owner)
	}
}

// TestHashToken: the SHA-256 digests of the one-block and two-block
// messages of FIPS 180-2, Appendix B.1 and B.2 (the digests quoted from
// memory).
func TestHashToken(t *testing.T) {
	t.Parallel()
	tests := []struct{ in, want string }{
		{"abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"},
		{"abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq", "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"},
	}
	for _, tt := range tests {
		if got := HashToken(tt.in); got != tt.want {
			t.Errorf("HashToken(%q) = %s, want %s", tt.in, got, tt.want)
		}
	}
}

// TestNewToken: the prefix, 43 base64url characters (RFC 4648 section
// 5, no padding: ceil(32×8/6) = 43) of the source's 32 bytes, and an
// error from a source that runs dry.
func TestNewToken(t *testing.T) {
	t.Parallel()
	tok, err := NewToken(strings.NewReader(strings.Repeat("\xff", TokenBytes)))
	if err != nil {
		t.Fatal(err)
	}
	// 32 bytes of 0xff: 256 one bits are 42 sextets of 63 ('_') and 4
	// bits left, 1111 padded to 111100 = 60 ('8').
	if want := TokenPrefix + strings.Repeat("_", 42) + "8"; tok != want {
		t.Errorf("NewToken of 0xff bytes = %q, want %q", tok, want)
	}
	if _, err := NewToken(strings.NewReader("short")); err == nil || !strings.Contains(err.Error(), io.ErrUnexpectedEOF.Error()) {
		t.Errorf("NewToken from 5 bytes: %v, want an unexpected EOF", err)
	}
}

// TestParseTokens: the file's two YAML styles and JSON, and each mistake
// named by entry and field.
func TestParseTokens(t *testing.T) {
	t.Parallel()
	h1, h2 := HashToken("one"), HashToken("two")
	tests := []struct {
		name string
		file string
		want string // in the error; "" for none
	}{
		{"flow", fmt.Sprintf("- {name: \"ci\", role: \"submitter\", sha256: %q}\n- {name: \"ops\", role: \"admin\", sha256: %q}\n", h1, h2), ""},
		{"block", fmt.Sprintf("# hashes\n- name: ci\n  role: reader\n  sha256: %s\n", strings.ToUpper(h1)), ""},
		{"json", fmt.Sprintf(`[{"name": "ci", "role": "admin", "sha256": %q}]`, h1), ""},
		{"empty list", "[]", "lists no tokens"},
		{"empty file", "", "lists no tokens"},
		{"not a list", "tokens: []", "must be a list"},
		{"misspelt field", fmt.Sprintf("- {name: ci, role: admin, sha265: %q}", h1), `unknown field "sha265"`},
		{"bad name", fmt.Sprintf("- {name: \"CI bot\", role: admin, sha256: %q}", h1), "[0].name:"},
		{"numeric name", fmt.Sprintf("- {name: 1e3, role: admin, sha256: %q}", h1), "quote names"},
		{"bad role", fmt.Sprintf("- {name: ci, role: root, sha256: %q}", h1), `[0].role: role "root" is not reader, submitter or admin`},
		{"short hash", "- {name: ci, role: admin, sha256: abc}", "[0].sha256: must be the 64 hex digits"},
		{"token instead of hash", "- {name: ci, role: admin, sha256: dft_AAAA}", "[0].sha256:"},
		{"duplicate name", fmt.Sprintf("- {name: ci, role: admin, sha256: %q}\n- {name: ci, role: reader, sha256: %q}", h1, h2), `[1].name: "ci" is also the name of entry 0`},
		{"duplicate hash", fmt.Sprintf("- {name: a, role: admin, sha256: %q}\n- {name: b, role: reader, sha256: %q}", h1, h1), "[1].sha256: is also the hash of entry 0"},
		{"two problems", "- {name: ci, role: root, sha256: x}", "[0].role: role \"root\" is not reader, submitter or admin; [0].sha256:"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			toks, err := ParseTokens([]byte(tt.file))
			switch {
			case tt.want == "" && err != nil:
				t.Fatalf("ParseTokens: %v", err)
			case tt.want == "":
				if _, ok := toks.lookup("one"); !ok {
					t.Error("the token whose hash was given is not found")
				}
				if _, ok := toks.lookup("three"); ok {
					t.Error("a token not in the file is found")
				}
			case err == nil:
				t.Fatalf("ParseTokens accepted %q", tt.file)
			case !strings.Contains(err.Error(), tt.want):
				t.Errorf("error %q does not contain %q", err, tt.want)
			}
		})
	}
}

// TestParseRole: the names round-trip; others are errors.
func TestParseRole(t *testing.T) {
	t.Parallel()
	for _, r := range []Role{RoleReader, RoleSubmitter, RoleAdmin} {
		if got, err := ParseRole(r.String()); err != nil || got != r {
			t.Errorf("ParseRole(%q) = %v, %v", r.String(), got, err)
		}
	}
	for _, s := range []string{"", "Admin", "root", "write"} {
		if _, err := ParseRole(s); err == nil {
			t.Errorf("ParseRole(%q) accepted", s)
		}
	}
}
