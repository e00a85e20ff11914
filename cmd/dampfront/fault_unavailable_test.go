package main

import (
	"context"
	"io"
	"net"
	"net/url"
	"strings"
	"sync"
	"testing"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/status"

	pb "dampfront/api/gen/dampfront/v1"
)

// The database unreachable when a job is submitted (the API server's
// connections to PostgreSQL pass through a proxy of the test, which is
// cut off): the call fails with Unavailable, which the client prints as
// such with exit code 1, and once the database is back no trace of the
// failed submit is in it, neither a job row nor a queued slice, while a
// new submit through the same server works.
func TestFaultDatabaseUnreachableAtSubmit(t *testing.T) {
	t.Parallel()
	db := testPostgresURL(t)
	pool := pgPool(t, db)
	u, err := url.Parse(db)
	if err != nil {
		t.Fatal(err)
	}
	proxy := startProxy(t, u.Host)
	s := startServer(t, proxy.viaProxy(db), nil, "--workers", "0")
	specPath := faultSpec(t, 12, 10)
	spec := &pb.JobSpec{}
	if err := readMessage(&env{}, specPath, spec); err != nil {
		t.Fatal(err)
	}
	ids := submitJobs(t, s, specPath, 1, 31) // a job from before the fault

	proxy.down()
	r := mustRun(t, exitFailure, nil, s.client("submit", specPath, "--seed", "32", "--timeout", "20s")...)
	if !strings.Contains(r.stderr, "unavailable") || r.stdout != "" {
		t.Errorf("submit with the database unreachable: stdout %q, stderr %q; want no job ID and a message that the service is unavailable", r.stdout, r.stderr)
	}
	conn, err := grpc.NewClient(s.addr, grpc.WithTransportCredentials(insecure.NewCredentials()))
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second)
	defer cancel()
	// Twice: at once, when the server's pool still holds the cut
	// connections ("conn closed"), and after a pause, when it dials anew
	// ("connection refused").
	for _, pause := range []time.Duration{0, 1500 * time.Millisecond} {
		time.Sleep(pause)
		_, err = pb.NewDampfrontServiceClient(conn).SubmitJob(ctx, &pb.SubmitJobRequest{Spec: spec})
		if st, _ := status.FromError(err); st.Code() != codes.Unavailable {
			t.Errorf("SubmitJob with the database unreachable for %v: %v; want code Unavailable", pause, err)
		}
	}

	proxy.up()
	if got := readJobs(t, pool); len(got) != 1 || got[ids[0]].state != "queued" {
		t.Errorf("after the failed submits the database holds jobs %+v; want only the job from before, queued", got)
	}
	if ss := readSlices(t, pool); len(ss) != 1 || len(ss[ids[0]]) != 1 {
		t.Errorf("after the failed submits the queue holds slices %+v; want only the first slice of the job from before", ss)
	}
	// The server reconnects (within the pool's retry; a submit may need
	// a second try while it does).
	var again []string
	deadline := time.Now().Add(commandTimeout)
	for len(again) == 0 {
		r := dampfront(t, nil, s.client("submit", specPath, "--seed", "33")...)
		switch {
		case r.code == exitOK:
			again = append(again, firstLine(r.stdout))
		case time.Now().After(deadline):
			t.Fatalf("submit after the database came back: exit code %d, %s", r.code, r.stderr)
		default:
			time.Sleep(200 * time.Millisecond)
		}
	}
	if got := readJobs(t, pool); len(got) != 2 || got[again[0]].state != "queued" {
		t.Errorf("after the database came back the database holds jobs %+v; want the two submitted", got)
	}
}

// tcpProxy forwards connections from a port of 127.0.0.1 to a database
// server, and can cut them off: down closes the listener and every open
// connection, as a database host going away would look to its clients;
// up listens on the same port again.
type tcpProxy struct {
	t      *testing.T
	target string
	addr   string

	mu    sync.Mutex
	l     net.Listener
	conns map[net.Conn]struct{}
	wg    sync.WaitGroup
}

// startProxy forwards to target (host:port); the cleanup closes it.
func startProxy(t *testing.T, target string) *tcpProxy {
	t.Helper()
	p := &tcpProxy{t: t, target: target, addr: "127.0.0.1:0", conns: map[net.Conn]struct{}{}}
	p.up()
	t.Cleanup(func() { p.down(); p.wg.Wait() })
	return p
}

// viaProxy is the URL u with its host and port replaced by the proxy's.
func (p *tcpProxy) viaProxy(u string) string {
	p.t.Helper()
	pu, err := url.Parse(u)
	if err != nil {
		p.t.Fatal(err)
	}
	pu.Host = p.addr
	return pu.String()
}

func (p *tcpProxy) up() {
	p.t.Helper()
	l, err := net.Listen("tcp", p.addr)
	if err != nil {
		p.t.Fatalf("proxy listen on %s: %v", p.addr, err)
	}
	p.mu.Lock()
	p.l, p.addr = l, l.Addr().String()
	p.mu.Unlock()
	p.wg.Add(1)
	go func() {
		defer p.wg.Done()
		for {
			c, err := l.Accept()
			if err != nil {
				return
			}
			p.wg.Add(1)
			go func() { defer p.wg.Done(); p.forward(c) }()
		}
	}()
}

func (p *tcpProxy) down() {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.l != nil {
		_ = p.l.Close()
		p.l = nil
	}
	for c := range p.conns {
		_ = c.Close()
	}
}

// forward copies both ways between c and a new connection to the
// target until either side closes or down is called.
func (p *tcpProxy) forward(c net.Conn) {
	s, err := net.DialTimeout("tcp", p.target, 5*time.Second)
	if err != nil {
		_ = c.Close()
		return
	}
	p.mu.Lock()
	if p.l == nil { // went down meanwhile
		p.mu.Unlock()
		_ = c.Close()
		_ = s.Close()
		return
	}
	p.conns[c], p.conns[s] = struct{}{}, struct{}{}
	p.mu.Unlock()
	done := make(chan struct{}, 2)
	go func() { _, _ = io.Copy(s, c); done <- struct{}{} }()
	go func() { _, _ = io.Copy(c, s); done <- struct{}{} }()
	<-done
	_ = c.Close()
	_ = s.Close()
	<-done
	p.mu.Lock()
	delete(p.conns, c)
	delete(p.conns, s)
	p.mu.Unlock()
}
