package main

import (
	"crypto/ecdsa"
	"crypto/elliptic"
	"crypto/rand"
	"crypto/x509"
	"crypto/x509/pkix"
	"encoding/pem"
	"math/big"
	"net"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"google.golang.org/protobuf/encoding/protojson"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
)

// testCA is a self-signed CA certificate and its key, made in the test:
// ECDSA P-256 (FIPS 186-4) and X.509 v3 (RFC 5280) with crypto/x509.
type testCA struct {
	cert *x509.Certificate
	key  *ecdsa.PrivateKey
	pem  []byte
}

func newTestCA(t *testing.T, name string, serial int64) *testCA {
	t.Helper()
	key, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	tmpl := &x509.Certificate{
		SerialNumber:          big.NewInt(serial),
		Subject:               pkix.Name{CommonName: name},
		NotBefore:             time.Now().Add(-time.Hour),
		NotAfter:              time.Now().Add(time.Hour),
		IsCA:                  true,
		BasicConstraintsValid: true,
		KeyUsage:              x509.KeyUsageCertSign,
	}
	der, err := x509.CreateCertificate(rand.Reader, tmpl, tmpl, &key.PublicKey, key)
	if err != nil {
		t.Fatal(err)
	}
	cert, err := x509.ParseCertificate(der)
	if err != nil {
		t.Fatal(err)
	}
	return &testCA{cert: cert, key: key, pem: pem.EncodeToMemory(&pem.Block{Type: "CERTIFICATE", Bytes: der})}
}

// serverCert writes a server certificate for 127.0.0.1 (an IP address
// SAN, RFC 5280 section 4.2.1.6) signed by ca, and its key, into dir.
func (ca *testCA) serverCert(t *testing.T, dir string) (certFile, keyFile string) {
	t.Helper()
	key, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	tmpl := &x509.Certificate{
		SerialNumber: big.NewInt(100),
		Subject:      pkix.Name{CommonName: "dampfront test server"},
		NotBefore:    time.Now().Add(-time.Hour),
		NotAfter:     time.Now().Add(time.Hour),
		KeyUsage:     x509.KeyUsageDigitalSignature,
		ExtKeyUsage:  []x509.ExtKeyUsage{x509.ExtKeyUsageServerAuth},
		IPAddresses:  []net.IP{net.IPv4(127, 0, 0, 1)},
	}
	der, err := x509.CreateCertificate(rand.Reader, tmpl, ca.cert, &key.PublicKey, ca.key)
	if err != nil {
		t.Fatal(err)
	}
	keyDER, err := x509.MarshalPKCS8PrivateKey(key)
	if err != nil {
		t.Fatal(err)
	}
	certFile = writeTestFile(t, dir, "server.pem", pem.EncodeToMemory(&pem.Block{Type: "CERTIFICATE", Bytes: der}))
	keyFile = writeTestFile(t, dir, "server-key.pem", pem.EncodeToMemory(&pem.Block{Type: "PRIVATE KEY", Bytes: keyDER}))
	return certFile, keyFile
}

func writeTestFile(t *testing.T, dir, name string, b []byte) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, b, 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// newToken runs "dampfront token new" and returns the token and the
// line for the tokens file.
func newToken(t *testing.T, name, role string) (token, line string) {
	t.Helper()
	r := mustRun(t, exitOK, nil, "token", "new", "--name", name, "--role", role)
	lines := strings.Split(strings.TrimSpace(r.stdout), "\n")
	if len(lines) != 2 || !strings.HasPrefix(lines[0], api.TokenPrefix) {
		t.Fatalf("token new printed %q, want the token and the file's line", r.stdout)
	}
	if !strings.Contains(lines[1], api.HashToken(lines[0])) {
		t.Fatalf("the tokens file line %q lacks the SHA-256 of the token", lines[1])
	}
	return lines[0], lines[1]
}

// TestTLSWithTokens runs the whole flow over TLS with a test CA and a
// token made by "token new": submit, watch, get, front and check; then
// the refusals: a client trusting another CA, one without TLS, one
// without a token or with an unknown one, and a reader submitting.
func TestTLSWithTokens(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	ca := newTestCA(t, "dampfront test CA", 1)
	certFile, keyFile := ca.serverCert(t, dir)
	caFile := writeTestFile(t, dir, "ca.pem", ca.pem)
	otherCA := writeTestFile(t, dir, "other-ca.pem", newTestCA(t, "another test CA", 2).pem)

	ciToken, ciLine := newToken(t, "ci", "submitter")
	readToken, readLine := newToken(t, "viewer", "reader")
	tokensFile := writeTestFile(t, dir, "tokens.yaml", []byte("# hashes of the test's tokens\n"+ciLine+"\n"+readLine+"\n"))
	s := startServer(t, filepath.Join(dir, "tls.db"), nil, "--tls-cert", certFile, "--tls-key", keyFile, "--tokens", tokensFile)
	ci := []string{"DAMPFRONT_TOKEN=" + ciToken, "DAMPFRONT_TLS_CA=" + caFile}

	id := firstLine(mustRun(t, exitOK, ci, s.client("submit", testdataPath("demo-job.yaml"), "--quiet")...).stdout)
	if id == "" || strings.Contains(id, " ") {
		t.Fatalf("submit printed %q as the job ID", id)
	}
	r := mustRun(t, exitOK, ci, s.client("watch", id, "--quiet")...)
	if !strings.Contains(r.stdout, "jobs/"+id+" succeeded") {
		t.Errorf("watch over TLS: no final line:\n%s", r.stdout)
	}
	// The flags instead of the environment.
	r = mustRun(t, exitOK, nil, s.client("get", id, "--format", "json", "--tls-ca", caFile, "--token", ciToken)...)
	var j pb.Job
	if err := protojson.Unmarshal([]byte(r.stdout), &j); err != nil {
		t.Fatalf("get --format json is not a Job: %v", err)
	}
	if got := j.GetLabels()[api.OwnerLabel]; got != "ci" {
		t.Errorf("job owner label %q, want ci", got)
	}
	front := parseFrontJSON(t, mustRun(t, exitOK, ci, s.client("front", id, "--format", "json")...).stdout)
	if front.TotalSize == 0 || len(front.Solutions) != front.TotalSize {
		t.Errorf("front over TLS: %d of %d solutions", len(front.Solutions), front.TotalSize)
	}
	// candidate-setup.yaml passes at a generous epsilon (serve_test.go).
	r = mustRun(t, exitOK, ci, s.client("check", id, "--setup", testdataPath("candidate-setup.yaml"), "--epsilon", "1")...)
	if !strings.HasPrefix(firstLine(r.stdout), "PASS") {
		t.Errorf("check over TLS: %s", firstLine(r.stdout))
	}
	if logs := s.logs.String(); !strings.Contains(logs, "serving TLS") || !strings.Contains(logs, "calls need a bearer token") {
		t.Errorf("the server's log does not say it serves TLS with tokens:\n%s", logs)
	}

	tests := []struct {
		name string
		env  []string
		args []string
		code int
		want string // in stderr
	}{
		{"another CA", []string{"DAMPFRONT_TOKEN=" + ciToken, "DAMPFRONT_TLS_CA=" + otherCA}, []string{"list"}, exitFailure, "certificate signed by unknown authority"},
		{"system CAs", []string{"DAMPFRONT_TOKEN=" + ciToken, "DAMPFRONT_TLS=true"}, []string{"list"}, exitFailure, "x509: "},
		// The plaintext client reads EOF or "connection reset by peer"
		// from the TLS server, as the close races the client's read; the
		// hint follows either.
		{"no TLS", []string{"DAMPFRONT_TOKEN=" + ciToken}, []string{"list"}, exitFailure, "server unavailable: connection error: desc = \"error reading server preface: "},
		{"no token", []string{"DAMPFRONT_TLS_CA=" + caFile}, []string{"list"}, exitFailure, "unauthenticated: no bearer token"},
		{"unknown token", []string{"DAMPFRONT_TOKEN=" + api.TokenPrefix + "not-one-of-the-file", "DAMPFRONT_TLS_CA=" + caFile}, []string{"list"}, exitFailure, "unauthenticated: the bearer token is not valid"},
		{"reader submits", []string{"DAMPFRONT_TOKEN=" + readToken, "DAMPFRONT_TLS_CA=" + caFile}, []string{"submit", testdataPath("demo-job.yaml")}, exitFailure, `permission denied: token "viewer" has role reader; SubmitJob needs submitter`},
		{"reader cancels", []string{"DAMPFRONT_TOKEN=" + readToken, "DAMPFRONT_TLS_CA=" + caFile}, []string{"cancel", id}, exitFailure, "permission denied"},
		{"CA file missing", []string{"DAMPFRONT_TOKEN=" + ciToken}, []string{"list", "--tls-ca", filepath.Join(dir, "none.pem")}, exitUsage, "none.pem"},
		{"CA file not PEM", []string{"DAMPFRONT_TOKEN=" + ciToken}, []string{"list", "--tls-ca", tokensFile}, exitUsage, "no PEM certificate"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			r := mustRun(t, tt.code, tt.env, s.client(append(tt.args, "--timeout", "10s")...)...)
			if !strings.Contains(r.stderr, tt.want) {
				t.Errorf("stderr does not contain %q:\n%s", tt.want, r.stderr)
			}
			if hint := "\n  if the server serves TLS, connect with --tls-ca FILE"; tt.name == "no TLS" && !strings.Contains(r.stderr, hint) {
				t.Errorf("stderr does not give the TLS hint %q:\n%s", hint, r.stderr)
			}
		})
	}
	// The reader's refused cancel left the job as it was.
	r = mustRun(t, exitOK, ci, s.client("get", id, "--format", "json")...)
	if err := protojson.Unmarshal([]byte(r.stdout), &j); err != nil || j.GetCancelRequested() || j.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Errorf("after the refused cancel: %v, %v", &j, err)
	}
}

// TestServeWithoutTokens: on loopback the server runs without tokens and
// says so in its log; on any other address it refuses to start, before
// it opens the database or listens, unless told --insecure-no-auth (not
// run here: tests listen on 127.0.0.1 only). A token is never sent
// unencrypted off loopback.
func TestServeWithoutTokens(t *testing.T) {
	t.Parallel()
	s := startServer(t, filepath.Join(t.TempDir(), "open.db"), nil)
	mustRun(t, exitOK, nil, s.client("list")...)
	if !strings.Contains(s.logs.String(), "authentication is off (no --tokens)") {
		t.Errorf("the server's log does not say authentication is off:\n%s", s.logs.String())
	}

	dir := t.TempDir()
	good := writeTestFile(t, dir, "tokens.yaml", []byte("- {name: \"ci\", role: \"admin\", sha256: \""+api.HashToken("x")+"\"}\n"))
	bad := writeTestFile(t, dir, "bad.yaml", []byte("- {name: \"ci\", role: \"root\", sha256: \""+api.HashToken("x")+"\"}\n"))
	tests := []struct {
		name string
		env  []string
		args []string
		want string
	}{
		// 192.0.2.0/24 is TEST-NET-1 (RFC 5737), never a local address.
		{"documentation address", nil, []string{"serve", "--addr", "192.0.2.1:0"}, "192.0.2.1:0 is not a loopback address: give --tokens FILE"},
		{"all interfaces", nil, []string{"serve", "--addr", ":7403"}, ":7403 is not a loopback address"},
		{"all IPv4 interfaces", nil, []string{"serve", "--addr", "0.0.0.0:0"}, "0.0.0.0:0 is not a loopback address"},
		{"a host name", []string{"DAMPFRONT_ADDR=dampfront.invalid:7403"}, []string{"serve"}, "dampfront.invalid:7403 is not a loopback address"},
		{"both insecure and tokens", nil, []string{"serve", "--addr", "127.0.0.1:0", "--insecure-no-auth", "--tokens", good}, "--insecure-no-auth and --tokens exclude each other"},
		{"bad tokens file", []string{"DAMPFRONT_TOKENS_FILE=" + bad}, []string{"serve", "--addr", "127.0.0.1:0"}, `[0].role: role "root"`},
		{"missing tokens file", nil, []string{"serve", "--addr", "127.0.0.1:0", "--tokens", filepath.Join(dir, "none.yaml")}, "none.yaml"},
		{"cert without key", nil, []string{"serve", "--addr", "127.0.0.1:0", "--tls-cert", good}, "give --tls-cert and --tls-key together"},
		{"cert not PEM", nil, []string{"serve", "--addr", "127.0.0.1:0", "--tls-cert", good, "--tls-key", good}, "tls: "},
		{"negative rpc timeout", nil, []string{"serve", "--addr", "127.0.0.1:0", "--rpc-timeout", "-1s"}, "--rpc-timeout not negative"},
		{"token in clear off loopback", []string{"DAMPFRONT_TOKEN=" + api.TokenPrefix + "x"}, []string{"list", "--addr", "192.0.2.1:7403"}, "refusing to send the bearer token unencrypted to 192.0.2.1:7403"},
		{"bad DAMPFRONT_TLS", []string{"DAMPFRONT_TLS=maybe"}, []string{"list"}, `$DAMPFRONT_TLS="maybe" is not true or false`},
		{"token without name", nil, []string{"token", "new", "--role", "admin"}, "--name and --role are required"},
		{"token bad role", nil, []string{"token", "new", "--name", "ci", "--role", "root"}, `--role: role "root"`},
		{"token bad name", nil, []string{"token", "new", "--name", "CI", "--role", "admin"}, `--name: token name "CI"`},
		{"token unknown action", nil, []string{"token", "revoke", "--name", "ci", "--role", "admin"}, `unknown action "revoke"`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			db := filepath.Join(t.TempDir(), "never.db")
			args := tt.args
			if args[0] == "serve" {
				args = append(append([]string(nil), args...), "--database", db)
			}
			r := mustRun(t, exitUsage, tt.env, args...)
			if !strings.Contains(r.stderr, tt.want) {
				t.Errorf("stderr does not contain %q:\n%s", tt.want, r.stderr)
			}
			if _, err := os.Stat(db); err == nil {
				t.Errorf("the refused serve created its database %s", db)
			}
		})
	}
}

// TestLoopbackAddr: loopback is 127.0.0.0/8 (RFC 1122, section
// 3.2.1.3) and ::1 (RFC 4291, section 2.5.3), or the name localhost; an
// empty host, an unspecified address or any other name is not.
func TestLoopbackAddr(t *testing.T) {
	t.Parallel()
	tests := []struct {
		addr string
		want bool
	}{
		{"127.0.0.1:7403", true},
		{"127.8.9.10:1", true},
		{"[::1]:7403", true},
		{"localhost:7403", true},
		{":7403", false},
		{"0.0.0.0:7403", false},
		{"[::]:7403", false},
		{"192.0.2.1:7403", false},
		{"128.0.0.1:7403", false},
		{"localhost.example.org:7403", false},
		{"dns:///127.0.0.1:7403", false},
		{"127.0.0.1", false},
	}
	for _, tt := range tests {
		if got := loopbackAddr(tt.addr); got != tt.want {
			t.Errorf("loopbackAddr(%q) = %v, want %v", tt.addr, got, tt.want)
		}
	}
}
