package api

import (
	"context"
	"crypto/tls"
	"fmt"

	"errors"
	"log/slog"
	"net"
	"runtime"
	"strconv"
	"sync"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/health"
	healthpb "google.golang.org/grpc/health/grpc_health_v1"
	"google.golang.org/grpc/reflection"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// Engine is what the service needs of the job engine; *jobs.Engine is
// the implementation.
type Engine interface {
	Submit(ctx context.Context, p *jobs.SubmitParams) (*jobs.Job, error)
	Get(ctx context.Context, id string) (*jobs.Job, error)
	List(ctx context.Context, p *jobs.JobListParams) (*jobs.JobListResult, error)
	Cancel(ctx context.Context, id string) (*jobs.Job, error)
	Watch(ctx context.Context, id string) (<-chan *jobs.Job, error)
	Front(ctx context.Context, p *jobs.FrontGetParams) (*jobs.FrontPage, error)
	Checkpoint(ctx context.Context, id string) ([]byte, error)
}

var _ Engine = (*jobs.Engine)(nil)

// Options configure a Server. Zero values take the defaults named.
type Options struct {
	// MaxMessageBytes limits every request and response message.
	// Default 16 MiB.
	MaxMessageBytes int
	// MaxSpecBytes limits the encoded size of a spec in any request that
	// carries one (SubmitJob, EvaluateSetups, VerifySetup): one limit for
	// all, the job engine's (jobs.Config.MaxSpecBytes) by default; more is
	// InvalidArgument on "spec". Default jobs.DefaultMaxSpecBytes (1 MiB).
	MaxSpecBytes int
	// MaxJobWork limits a submitted job's work in case evaluations (one
	// setup on one case): population_size × islands × (generations +
	// polish_budget) × cases, plus the bounds of the polish's
	// neighbourhood rounds and of the refinement (study.Size); more is
	// ResourceExhausted naming the fields behind the largest part.
	// Default 50 000 000, about a night on two cores.
	MaxJobWork int64
	// MaxGridPoints limits the frequency grid of a submitted or evaluated
	// spec (the cost of one evaluation grows with it); more is
	// ResourceExhausted. Default 2001, eight times the model's default.
	MaxGridPoints int
	// MaxRoadCases limits the road cases of a submitted or evaluated
	// spec; more is ResourceExhausted naming spec.road_cases, refused
	// before the spec is checked or compiled (both grow with the cases).
	// Default 64.
	MaxRoadCases int
	// MaxSyncWork limits setups × road cases of one EvaluateSetups call.
	// Default 4096.
	MaxSyncWork int
	// MaxConcurrentEvaluations limits the EvaluateSetups, CompareSetup
	// and VerifySetup calls running at once (a VerifySetup holds its slot
	// until its check ends, also when the call has ended before); one more
	// is ResourceExhausted at once, not queued. Default GOMAXPROCS.
	MaxConcurrentEvaluations int
	// MaxConcurrentSubmits limits the SubmitJob calls that check and
	// compile a spec at once (the compile grows with the road cases and
	// the grid); the others wait for a slot of their own, under their
	// call's deadline, and a call that ends while waiting compiles
	// nothing. Submits never take the evaluations' slots. Default
	// GOMAXPROCS.
	MaxConcurrentSubmits int
	// StopTimeout bounds the graceful part of Serve's shutdown; then open
	// calls are cut. Default 10 s.
	StopTimeout time.Duration
	// Logger receives the server's logs. Default slog.Default().
	Logger *slog.Logger
	// Tokens, when set, are the bearer tokens the server accepts, each
	// with a role; see auth.go. Nil serves every call unauthenticated.
	Tokens *Tokens
	// TLS, when set, serves TLS with this configuration (its
	// certificates at least). Nil serves plaintext HTTP/2.
	TLS *tls.Config
	// RPCTimeout bounds each unary call on the server, however long the
	// client's deadline; WatchJob is not bounded. Default
	// DefaultRPCTimeout; negative means no bound.
	RPCTimeout time.Duration
}

// Defaults of Options.
const (
	DefaultMaxMessageBytes = 16 << 20
	DefaultMaxJobWork      = 50_000_000
	DefaultMaxGridPoints   = 2001
	DefaultMaxSyncWork     = 4096
	DefaultMaxRoadCases    = 64
	DefaultStopTimeout     = 10 * time.Second
)

func (o Options) withDefaults() Options {
	if o.MaxMessageBytes <= 0 {
		o.MaxMessageBytes = DefaultMaxMessageBytes
	}
	if o.MaxSpecBytes <= 0 {
		o.MaxSpecBytes = jobs.DefaultMaxSpecBytes
	}
	if o.MaxJobWork <= 0 {
		o.MaxJobWork = DefaultMaxJobWork
	}
	if o.MaxGridPoints <= 0 {
		o.MaxGridPoints = DefaultMaxGridPoints
	}
	if o.MaxRoadCases <= 0 {
		o.MaxRoadCases = DefaultMaxRoadCases
	}
	if o.MaxSyncWork <= 0 {
		o.MaxSyncWork = DefaultMaxSyncWork
	}
	if o.MaxConcurrentEvaluations <= 0 {
		o.MaxConcurrentEvaluations = runtime.GOMAXPROCS(0)
	}
	if o.MaxConcurrentSubmits <= 0 {
		o.MaxConcurrentSubmits = runtime.GOMAXPROCS(0)
	}
	if o.StopTimeout <= 0 {
		o.StopTimeout = DefaultStopTimeout
	}
	if o.Logger == nil {
		o.Logger = slog.Default()
	}
	return o
}

// Server is the DampfrontService over a job engine, with the standard
// health service and server reflection beside it.
type Server struct {
	pb.UnimplementedDampfrontServiceServer

	engine Engine
	opt    Options
	health *health.Server
	slots  chan struct{} // one per synchronous evaluation running
	// submitSlots has one per SubmitJob checking and compiling a spec.
	submitSlots chan struct{}

	// onCompile, when set (by tests), is called before each compile of
	// a spec.
	onCompile func()

	stopping chan struct{} // closed when shutdown begins
	stopOnce sync.Once
}

// NewServer returns the service over engine.
func NewServer(engine Engine, opt Options) (*Server, error) {
	if engine == nil {
		return nil, errors.New("api: NewServer needs an engine")
	}
	opt = opt.withDefaults()
	return &Server{
		engine: engine,
		opt:    opt,
		health: health.NewServer(),
		slots:  make(chan struct{}, opt.MaxConcurrentEvaluations),

		submitSlots: make(chan struct{}, opt.MaxConcurrentSubmits),
		stopping:    make(chan struct{}),
	}, nil
}

// ServerOptions are the gRPC options the limits, TLS, call deadlines and
// authentication call for; NewGRPCServer applies them.
func (s *Server) ServerOptions() []grpc.ServerOption {
	return append([]grpc.ServerOption{
		grpc.MaxRecvMsgSize(s.opt.MaxMessageBytes),
		grpc.MaxSendMsgSize(s.opt.MaxMessageBytes),
	}, s.callOptions()...)
}

// Register registers the service, the health service (serving, for ""
// and for dampfront.v1.DampfrontService) and reflection on g.
func (s *Server) Register(g *grpc.Server) {
	pb.RegisterDampfrontServiceServer(g, s)
	healthpb.RegisterHealthServer(g, s.health)
	reflection.Register(g)
	s.health.SetServingStatus("", healthpb.HealthCheckResponse_SERVING)
	s.health.SetServingStatus(pb.DampfrontService_ServiceDesc.ServiceName, healthpb.HealthCheckResponse_SERVING)
}

// NewGRPCServer returns a gRPC server with the limits' options, opts, and
// everything registered.
func (s *Server) NewGRPCServer(opts ...grpc.ServerOption) *grpc.Server {
	g := grpc.NewServer(append(s.ServerOptions(), opts...)...)
	s.Register(g)
	return g
}

// Serve serves on lis until ctx is done, then shuts down: health turns to
// NOT_SERVING, open WatchJob streams end with Unavailable, and
// GracefulStop waits for the other calls for at most Options.StopTimeout,
// after which Stop cuts them. It returns nil after a shutdown, or the
// error that ended serving otherwise. The engine is the caller's to stop.
func (s *Server) Serve(ctx context.Context, lis net.Listener, opts ...grpc.ServerOption) error {
	g := s.NewGRPCServer(opts...)
	errc := make(chan error, 1)
	go func() { errc <- g.Serve(lis) }()
	select {
	case err := <-errc:
		s.beginShutdown()
		return err
	case <-ctx.Done():
	}
	s.opt.Logger.Info("api: shutting down", "address", lis.Addr().String(), "timeout", s.opt.StopTimeout)
	s.shutdown(g)
	if err := <-errc; err != nil && !errors.Is(err, grpc.ErrServerStopped) {
		return err
	}
	return nil
}

// beginShutdown marks the server stopping: health NOT_SERVING, watches end.
func (s *Server) beginShutdown() {
	s.stopOnce.Do(func() {
		close(s.stopping)
		s.health.Shutdown()
	})
}

// shutdown stops g gracefully within the stop timeout, then hard.
func (s *Server) shutdown(g *grpc.Server) {
	s.beginShutdown()
	done := make(chan struct{})
	go func() {
		g.GracefulStop()
		close(done)
	}()
	t := time.NewTimer(s.opt.StopTimeout)
	defer t.Stop()
	select {
	case <-done:
	case <-t.C:
		s.opt.Logger.Warn("api: graceful stop timed out; closing open calls", "timeout", s.opt.StopTimeout)
		g.Stop()
		<-done
	}
}

// isStopping reports whether shutdown has begun.
func (s *Server) isStopping() bool {
	select {
	case <-s.stopping:
		return true
	default:
		return false
	}
}

// acquire takes a synchronous-evaluation slot, or fails at once with
// ResourceExhausted; release gives it back.
func (s *Server) acquire() (release func(), err error) {
	select {
	case s.slots <- struct{}{}:
		return func() { <-s.slots }, nil
	default:
		return nil, resourceExhausted(ReasonServerBusy,
			"too many synchronous evaluations are running; retry in a second",
			map[string]string{"limit": strconv.Itoa(s.opt.MaxConcurrentEvaluations)}, time.Second)
	}
}

// checkSpecSize refuses a spec over the size limit, before any work is
// done on it, with the engine's wording.
func (s *Server) checkSpecSize(spec *pb.JobSpec) error {
	if n := proto.Size(spec); n > s.opt.MaxSpecBytes {
		return invalidArgument(problems{{Field: "spec", Reason: fmt.Sprintf("is %d bytes, at most %d allowed", n, s.opt.MaxSpecBytes)}})
	}
	return nil
}

// acquireSubmit waits for a submit slot, or returns the status of ctx's
// error when ctx ends first; release gives the slot back.
func (s *Server) acquireSubmit(ctx context.Context) (release func(), err error) {
	select {
	case s.submitSlots <- struct{}{}:
		return func() { <-s.submitSlots }, nil
	case <-ctx.Done():
		return nil, toStatus(ctx.Err(), nil)
	}
}
