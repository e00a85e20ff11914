package web

import (
	"context"
	"errors"
	"net"

	"google.golang.org/grpc"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/test/bufconn"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
)

// Local is an in-process connection to a DampfrontService: a gRPC server
// of its own for srv on an in-memory listener, and a client of it. The
// page reads through it with each reader's token, so the service's
// authentication, roles, limits and call deadlines apply to the page as
// to any other client, over the same engine as the network server.
type Local struct {
	conn *grpc.ClientConn
	g    *grpc.Server
	lis  *bufconn.Listener
	done chan error
}

// localBuffer is the in-memory listener's buffer per direction.
const localBuffer = 1 << 20

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
	l := &Local{g: srv.NewGRPCServer(opts...), lis: bufconn.Listen(localBuffer), done: make(chan error, 1)}
	go func() { l.done <- l.g.Serve(l.lis) }()
	conn, err := grpc.NewClient("passthrough:///dampfront-local",
		grpc.WithTransportCredentials(insecure.NewCredentials()),
		grpc.WithContextDialer(func(ctx context.Context, _ string) (net.Conn, error) { return l.lis.DialContext(ctx) }),
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
