package main

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// SIGHUP reloads the tokens file and the certificate of a running
// server: a token taken out of the file is refused from then on and one
// put in is accepted; a client that trusts only the new certificate's CA
// connects; a broken tokens file is refused, logged, and the set in use
// stays. The server keeps serving throughout (SIGHUP would otherwise end
// it, as the default action of the signal).
func TestServeReloadsOnSIGHUP(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	oldCA := newTestCA(t, "dampfront test CA, before", 11)
	newCA := newTestCA(t, "dampfront test CA, after", 12)
	oldDir, newDir := filepath.Join(dir, "old"), filepath.Join(dir, "new")
	for _, d := range []string{oldDir, newDir} {
		if err := os.MkdirAll(d, 0o700); err != nil {
			t.Fatal(err)
		}
	}
	oldCert, oldKey := oldCA.serverCert(t, oldDir)
	newCert, newKey := newCA.serverCert(t, newDir)
	oldCAFile := writeTestFile(t, dir, "old-ca.pem", oldCA.pem)
	newCAFile := writeTestFile(t, dir, "new-ca.pem", newCA.pem)
	// The server reads its certificate from these two paths; the test
	// overwrites them with the new pair before the SIGHUP.
	certFile := writeTestFile(t, dir, "server.pem", readTestFile(t, oldCert))
	keyFile := writeTestFile(t, dir, "server-key.pem", readTestFile(t, oldKey))

	leaving, leavingLine := newToken(t, "leaving", "reader")
	arriving, arrivingLine := newToken(t, "arriving", "reader")
	tokensFile := writeTestFile(t, dir, "tokens.yaml", []byte(leavingLine+"\n"))
	s := startServer(t, filepath.Join(dir, "reload.db"), nil, "--workers", "0",
		"--tls-cert", certFile, "--tls-key", keyFile, "--tokens", tokensFile)
	list := func(token, ca string) result {
		return dampfront(t, []string{"DAMPFRONT_TOKEN=" + token, "DAMPFRONT_TLS_CA=" + ca}, s.client("list", "--timeout", "10s")...)
	}
	if r := list(leaving, oldCAFile); r.code != exitOK {
		t.Fatalf("before the reload, the file's token: exit %d, %s", r.code, r.stderr)
	}
	if r := list(arriving, oldCAFile); r.code != exitFailure || !strings.Contains(r.stderr, "unauthenticated") {
		t.Fatalf("before the reload, a token not yet in the file: exit %d, %s; want unauthenticated", r.code, r.stderr)
	}

	writeTestFile(t, dir, "tokens.yaml", []byte(arrivingLine+"\n"))
	writeTestFile(t, dir, "server.pem", readTestFile(t, newCert))
	writeTestFile(t, dir, "server-key.pem", readTestFile(t, newKey))
	hangUp(t, s, 1)
	if r := list(arriving, newCAFile); r.code != exitOK {
		t.Errorf("after the reload, the new token with the new CA: exit %d, %s", r.code, r.stderr)
	}
	if r := list(leaving, newCAFile); r.code != exitFailure || !strings.Contains(r.stderr, "unauthenticated") {
		t.Errorf("after the reload, the token taken out: exit %d, %s; want unauthenticated", r.code, r.stderr)
	}
	if r := list(arriving, oldCAFile); r.code != exitFailure || !strings.Contains(r.stderr, "certificate signed by unknown authority") {
		t.Errorf("after the reload, a client trusting only the old CA: exit %d, %s; want the certificate refused", r.code, r.stderr)
	}

	writeTestFile(t, dir, "tokens.yaml", []byte("- name: broken\n  role: nobody\n"))
	hangUp(t, s, 2)
	if logs := s.logs.String(); !strings.Contains(logs, "reload refused") || !strings.Contains(logs, "tokens.yaml") {
		t.Errorf("a broken tokens file at SIGHUP is not named in the log:\n%s", logs)
	}
	if r := list(arriving, newCAFile); r.code != exitOK {
		t.Errorf("after a refused reload, the token in use: exit %d, %s; want it still accepted", r.code, r.stderr)
	}
}

// hangUp sends SIGHUP to the server and waits until its log shows the
// n-th reload outcome (reloaded or refused).
func hangUp(t *testing.T, s *server, n int) {
	t.Helper()
	if err := s.cmd.Process.Signal(syscall.SIGHUP); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(serverStart)
	for strings.Count(s.logs.String(), "SIGHUP: re") < n {
		select {
		case <-s.done:
			t.Fatalf("the server exited on SIGHUP:\n%s", s.logs.String())
		case <-time.After(20 * time.Millisecond):
		}
		if time.Now().After(deadline) {
			t.Fatalf("no reload %d in the log within %v:\n%s", n, serverStart, s.logs.String())
		}
	}
}

func readTestFile(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
