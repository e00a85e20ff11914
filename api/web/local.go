package web

import (
	"context"
	"errors"
	"net"
	"sync"

	"google.golang.org/grpc"
	"google.golang.org/grpc/credentials/insecure"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
)

// Local is an in-process connection to a DampfrontService: a gRPC server
// of its own for srv on an in-memory listener (pipeListener: no port, no
// file, nothing another process can reach), and a client of it. The
// page reads through it with each reader's token, so the service's
// authentication, roles, limits and call deadlines apply to the page as
// to any other client, over the same engine as the network server.
type Local struct {
	conn *grpc.ClientConn
	g    *grpc.Server
	lis  *pipeListener
	done chan error
}

// localMaxMessage is the client's limit of a response; the server's own
// Options.MaxMessageBytes is the tighter one.
const localMaxMessage = 1 << 30

// NewLocal serves srv in process with the gRPC options opts. The bytes
// never leave the process, so srv must have been made without TLS
// (api.Options.TLS nil; the network server's Options otherwise).
func NewLocal(srv *api.Server, opts ...grpc.ServerOption) (*Local, error) {
	if srv == nil {
		return nil, errors.New("web: NewLocal needs a server")
	}
	l := &Local{g: srv.NewGRPCServer(opts...), lis: newPipeListener(), done: make(chan error, 1)}
	go func() { l.done <- l.g.Serve(l.lis) }()
	conn, err := grpc.NewClient("passthrough:///dampfront-local",
		grpc.WithTransportCredentials(insecure.NewCredentials()),
		grpc.WithContextDialer(func(ctx context.Context, _ string) (net.Conn, error) { return l.lis.dial(ctx) }),
		grpc.WithDefaultCallOptions(grpc.MaxCallRecvMsgSize(localMaxMessage)))
	if err != nil {
		l.g.Stop()
		return nil, err
	}
	l.conn = conn
	return l, nil
}

// Client is the service's client over the connection.
func (l *Local) Client() pb.DampfrontServiceClient { return pb.NewDampfrontServiceClient(l.conn) }

// Close closes the connection and stops the server, cutting calls still
// open (stop the HTTP server first so that none are).
func (l *Local) Close() error {
	err := l.conn.Close()
	l.g.Stop()
	if serr := <-l.done; serr != nil && !errors.Is(serr, grpc.ErrServerStopped) {
		err = errors.Join(err, serr)
	}
	return err
}

// pipeListener is a net.Listener whose connections are net.Pipe pairs
// made by dial in the same process: synchronous, in memory, and closed
// with the listener.
type pipeListener struct {
	conns     chan net.Conn
	closed    chan struct{}
	closeOnce sync.Once
}

func newPipeListener() *pipeListener {
	return &pipeListener{conns: make(chan net.Conn), closed: make(chan struct{})}
}

// errListenerClosed is what Accept and dial return after Close.
var errListenerClosed = errors.New("web: in-process listener closed")

// dial connects to the listener: it hands one end of a new pipe to
// Accept and returns the other, or fails when ctx ends or the listener
// is closed first.
func (l *pipeListener) dial(ctx context.Context) (net.Conn, error) {
	client, server := net.Pipe()
	select {
	case l.conns <- server:
		return client, nil
	case <-l.closed:
		err := errListenerClosed
		_, _ = client.Close(), server.Close()
		return nil, err
	case <-ctx.Done():
		_, _ = client.Close(), server.Close()
		return nil, ctx.Err()
	}
}

// Accept implements net.Listener.
func (l *pipeListener) Accept() (net.Conn, error) {
	select {
	case c := <-l.conns:
		return c, nil
	case <-l.closed:
		return nil, errListenerClosed
	}
}

// Close implements net.Listener; connections already made stay open
// until their ends close them.
func (l *pipeListener) Close() error {
	l.closeOnce.Do(func() { close(l.closed) })
	return nil
}

// Addr implements net.Listener.
func (l *pipeListener) Addr() net.Addr { return pipeAddr{} }

// pipeAddr is the address of a pipeListener.
type pipeAddr struct{}

func (pipeAddr) Network() string { return "pipe" }
func (pipeAddr) String() string  { return "dampfront-local" }
