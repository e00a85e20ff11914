package api

import (
	"context"
	"fmt"
	"strings"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials"
	healthpb "google.golang.org/grpc/health/grpc_health_v1"
	"google.golang.org/grpc/metadata"
	"google.golang.org/grpc/peer"
	reflectionpb "google.golang.org/grpc/reflection/grpc_reflection_v1"

	pb "dampfront/api/gen/dampfront/v1"
)

// Authentication and authorisation of calls.
//
// With Options.Tokens set, every call of DampfrontService carries the
// metadata "authorization: Bearer TOKEN" (RFC 6750, section 2.1), TOKEN
// one of the set. No token, a malformed header or an unknown token is
// Unauthenticated; a known token whose role does not allow the call is
// PermissionDenied (the distinction of gRPC's status codes: the caller
// is unknown, or known and refused). The health service and server
// reflection stay open to all, for load balancers' probes and for tools
// that list the API; they tell nothing of the jobs.
//
// SubmitJob records the submitting token's name in the job's labels
// under OwnerLabel; a submitter may cancel only jobs whose owner it is,
// an admin any job. Label keys starting with ReservedLabelPrefix are the
// server's: a spec that sets one is InvalidArgument, with or without
// authentication, so that no job can claim an owner it does not have.
// Without Options.Tokens every call is allowed and jobs get no owner;
// once tokens are turned on, only an admin can cancel such jobs.

// ReservedLabelPrefix starts the label keys that only the server sets.
const ReservedLabelPrefix = "dampfront."

// OwnerLabel is the job label holding the name of the token that
// submitted the job, when the server authenticates calls.
const OwnerLabel = ReservedLabelPrefix + "owner"

// ErrorInfo reasons of refused calls.
const (
	ReasonUnauthenticated = "UNAUTHENTICATED"  // no bearer token, a malformed one or an unknown one
	ReasonRoleNotAllowed  = "ROLE_NOT_ALLOWED" // the token's role does not allow the call
	ReasonNotJobOwner     = "NOT_JOB_OWNER"    // a submitter cancelling a job another token submitted
)

// methodRoles is the least role each call needs. A method of the service
// missing here needs RoleAdmin, so a new RPC is closed until it is given
// a role.
var methodRoles = map[string]Role{
	pb.DampfrontService_GetJob_FullMethodName:              RoleReader,
	pb.DampfrontService_ListJobs_FullMethodName:            RoleReader,
	pb.DampfrontService_WatchJob_FullMethodName:            RoleReader,
	pb.DampfrontService_GetFront_FullMethodName:            RoleReader,
	pb.DampfrontService_EstimateByHand_FullMethodName:      RoleReader, // no job, no road: the car alone
	pb.DampfrontService_SubmitJob_FullMethodName:           RoleSubmitter,
	pb.DampfrontService_EvaluateSetups_FullMethodName:      RoleSubmitter,
	pb.DampfrontService_CompareSetup_FullMethodName:        RoleSubmitter,
	pb.DampfrontService_GetDamperCurves_FullMethodName:     RoleSubmitter,
	pb.DampfrontService_VerifySetup_FullMethodName:         RoleSubmitter,
	pb.DampfrontService_GetTransientHistory_FullMethodName: RoleSubmitter,
	pb.DampfrontService_CancelJob_FullMethodName:           RoleSubmitter, // own jobs; others' need RoleAdmin
}

// openServices answer without a token.
var openServices = map[string]bool{
	healthpb.Health_ServiceDesc.ServiceName:               true,
	reflectionpb.ServerReflection_ServiceDesc.ServiceName: true,
	"grpc.reflection.v1alpha.ServerReflection":            true, // registered beside v1 by reflection.Register
}

// openMethod reports whether fullMethod ("/package.Service/Method") is
// of an open service.
func openMethod(fullMethod string) bool {
	service, _, _ := strings.Cut(strings.TrimPrefix(fullMethod, "/"), "/")
	return openServices[service]
}

// caller is the authenticated token of a call.
type caller struct {
	name string
	role Role
}

// authenticate returns the caller of ctx's bearer token; nil, nil when
// the server does not authenticate.
func (s *Server) authenticate(ctx context.Context, method string) (*caller, error) {
	if s.opt.Tokens == nil {
		return nil, nil
	}
	refuse := func(why, msg string) error {
		s.opt.Logger.Info("api: call refused", "method", method, "peer", peerAddr(ctx), "why", why)
		return statusError(codes.Unauthenticated, msg, ReasonUnauthenticated, nil)
	}
	md, _ := metadata.FromIncomingContext(ctx)
	values := md.Get("authorization")
	switch {
	case len(values) == 0:
		return nil, refuse("no token", `no bearer token: send the metadata "authorization: Bearer TOKEN" (dampfront clients: $DAMPFRONT_TOKEN or --token)`)
	case len(values) > 1:
		return nil, refuse("several authorization values", "send one authorization metadata value, not several")
	}
	// The auth scheme is case-insensitive (RFC 7235, section 2.1).
	scheme, token, ok := strings.Cut(values[0], " ")
	if !ok || !strings.EqualFold(scheme, "Bearer") || token == "" {
		return nil, refuse("not a bearer token", `the authorization metadata must be "Bearer TOKEN"`)
	}
	e, ok := s.opt.Tokens.lookup(token)
	if !ok {
		return nil, refuse("unknown token", "the bearer token is not valid on this server; ask its administrator for one")
	}
	return &caller{name: e.name, role: e.role}, nil
}

// authorize checks that c may call method.
func (s *Server) authorize(ctx context.Context, c *caller, method string) error {
	if c == nil {
		return nil
	}
	need, ok := methodRoles[method]
	if !ok {
		need = RoleAdmin
	}
	if c.role >= need {
		return nil
	}
	short := method[strings.LastIndexByte(method, '/')+1:]
	s.opt.Logger.Info("api: call refused", "method", method, "peer", peerAddr(ctx), "token", c.name, "role", c.role.String())
	return statusError(codes.PermissionDenied,
		fmt.Sprintf("token %q has role %s; %s needs %s or above", c.name, c.role, short, need),
		ReasonRoleNotAllowed, map[string]string{"token": c.name, "role": c.role.String(), "needed_role": need.String()})
}

// claimJob refuses reserved label keys in a submitted spec and, when the
// call is authenticated, labels the job with its owner. The labels are
// the spec's, which the job's labels are taken from.
func claimJob(req *pb.SubmitJobRequest, c *caller) error {
	spec := req.GetSpec()
	if spec == nil {
		return nil // SubmitJob says that the spec is required
	}
	var p problems
	for k := range spec.GetLabels() {
		if strings.HasPrefix(k, ReservedLabelPrefix) {
			p.add(fmt.Sprintf("spec.labels[%q]", k), "label keys starting with %q are set by the server (%s is the submitting token's name); use another key", ReservedLabelPrefix, OwnerLabel)
		}
	}
	if err := p.err(); err != nil {
		return err
	}
	if c != nil {
		if spec.Labels == nil {
			spec.Labels = map[string]string{}
		}
		spec.Labels[OwnerLabel] = c.name
	}
	return nil
}

// checkOwner lets a submitter cancel only its own jobs. A bad name or an
// unknown job is left to CancelJob to report.
func (s *Server) checkOwner(ctx context.Context, req *pb.CancelJobRequest, c *caller) error {
	if c == nil || c.role >= RoleAdmin {
		return nil
	}
	var p problems
	id := parseJobName(req.GetName(), "name", &p)
	if len(p) > 0 {
		return nil
	}
	j, err := s.engine.Get(ctx, id)
	if err != nil {
		return toStatus(err, nil)
	}
	if owner := j.Labels[OwnerLabel]; owner != c.name {
		s.opt.Logger.Info("api: call refused", "method", pb.DampfrontService_CancelJob_FullMethodName, "peer", peerAddr(ctx), "token", c.name, "job_id", id, "owner", owner)
		msg := fmt.Sprintf("job %q was submitted by token %q; only that token or an admin token may cancel it", jobName(id), owner)
		if owner == "" {
			msg = fmt.Sprintf("job %q was submitted without a token; only an admin token may cancel it", jobName(id))
		}
		return statusError(codes.PermissionDenied, msg, ReasonNotJobOwner,
			map[string]string{"job_id": id, "token": c.name, "owner": owner})
	}
	return nil
}

// authUnary authenticates and authorises a unary call of the service,
// then applies the per-call rules of SubmitJob and CancelJob.
func (s *Server) authUnary(ctx context.Context, req any, info *grpc.UnaryServerInfo, handler grpc.UnaryHandler) (any, error) {
	if openMethod(info.FullMethod) {
		return handler(ctx, req)
	}
	c, err := s.authenticate(ctx, info.FullMethod)
	if err != nil {
		return nil, err
	}
	if err := s.authorize(ctx, c, info.FullMethod); err != nil {
		return nil, err
	}
	switch r := req.(type) {
	case *pb.SubmitJobRequest:
		if err := claimJob(r, c); err != nil {
			return nil, err
		}
	case *pb.CancelJobRequest:
		if err := s.checkOwner(ctx, r, c); err != nil {
			return nil, err
		}
	}
	return handler(ctx, req)
}

// authStream authenticates and authorises a streaming call.
func (s *Server) authStream(srv any, ss grpc.ServerStream, info *grpc.StreamServerInfo, handler grpc.StreamHandler) error {
	if openMethod(info.FullMethod) {
		return handler(srv, ss)
	}
	c, err := s.authenticate(ss.Context(), info.FullMethod)
	if err != nil {
		return err
	}
	if err := s.authorize(ss.Context(), c, info.FullMethod); err != nil {
		return err
	}
	return handler(srv, ss)
}

// callOptions are the gRPC server options of TLS, call deadlines,
// authentication and the answer to requests that do not decode (see
// wire.go); ServerOptions includes them.
func (s *Server) callOptions() []grpc.ServerOption {
	opts := []grpc.ServerOption{grpc.ForceServerCodecV2(newWireCodec())}
	if s.opt.TLS != nil {
		opts = append(opts, grpc.Creds(credentials.NewTLS(s.opt.TLS)))
	}
	return append(opts,
		grpc.ChainUnaryInterceptor(s.deadlineUnary, s.authUnary, wireUnary),
		grpc.ChainStreamInterceptor(s.authStream, wireStream),
	)
}

// peerAddr is the caller's network address, for logs.
func peerAddr(ctx context.Context) string {
	if p, ok := peer.FromContext(ctx); ok && p.Addr != nil {
		return p.Addr.String()
	}
	return ""
}
