package main

import (
	"context"
	"crypto/tls"
	"crypto/x509"
	"errors"
	"log/slog"
	"net"
	"os"
	"strconv"
	"strings"
	"sync/atomic"

	"google.golang.org/grpc"
	"google.golang.org/grpc/credentials"
	"google.golang.org/grpc/credentials/insecure"

	"dampfront/api"
)

// Authentication and TLS of serve and of the client subcommands.

// serverSecurityFlags are serve's flags of authentication and TLS.
type serverSecurityFlags struct {
	tokensFile     string
	tlsCert        string
	tlsKey         string
	insecureNoAuth bool
}

func addServerSecurityFlags(fs *flagSet, e *env) *serverSecurityFlags {
	f := &serverSecurityFlags{}
	fs.StringVar(&f.tokensFile, "tokens", envOr(e, "DAMPFRONT_TOKENS_FILE", ""),
		"tokens `file` (YAML or JSON list of name, role, sha256); every call but health and reflection then needs one of its tokens ($DAMPFRONT_TOKENS_FILE)")
	fs.StringVar(&f.tlsCert, "tls-cert", envOr(e, "DAMPFRONT_TLS_CERT", ""), "serve TLS with the PEM certificate chain in this `file`; needs --tls-key ($DAMPFRONT_TLS_CERT)")
	fs.StringVar(&f.tlsKey, "tls-key", envOr(e, "DAMPFRONT_TLS_KEY", ""), "PEM private key `file` of --tls-cert ($DAMPFRONT_TLS_KEY)")
	fs.BoolVar(&f.insecureNoAuth, "insecure-no-auth", false, "serve without --tokens on an address that is not loopback: anyone who reaches it may submit and cancel any job")
	return f
}

// serverSecurity is what the flags loaded: the tokens and TLS of the
// server, and how to say it at start. reload reads the files again.
type serverSecurity struct {
	tokens   *api.Tokens
	tls      *tls.Config
	cert     atomic.Pointer[tls.Certificate] // what tls hands out, swapped by reload
	loopback bool
}

// load reads the tokens file and the certificate, and refuses to serve
// without authentication off loopback unless --insecure-no-auth says so.
// It runs before anything listens.
func (f *serverSecurityFlags) load(cmd, addr string) (*serverSecurity, error) {
	s := &serverSecurity{loopback: loopbackAddr(addr)}
	if (f.tlsCert == "") != (f.tlsKey == "") {
		return nil, usagef(cmd, "give --tls-cert and --tls-key together")
	}
	if f.insecureNoAuth && f.tokensFile != "" {
		return nil, usagef(cmd, "--insecure-no-auth and --tokens exclude each other")
	}
	if f.tokensFile == "" && !s.loopback && !f.insecureNoAuth {
		return nil, usagef(cmd, "%s is not a loopback address: give --tokens FILE (make tokens with 'dampfront token new'), or --insecure-no-auth to let anyone who reaches it submit and cancel jobs", addr)
	}
	tokens, cert, err := f.read()
	if err != nil {
		return nil, err
	}
	s.tokens = tokens
	if cert != nil {
		s.cert.Store(cert)
		s.tls = &tls.Config{
			GetCertificate: func(*tls.ClientHelloInfo) (*tls.Certificate, error) { return s.cert.Load(), nil },
			MinVersion:     tls.VersionTLS12,
		}
	}
	return s, nil
}

// read reads the tokens file and the certificate and key, those given.
func (f *serverSecurityFlags) read() (*api.Tokens, *tls.Certificate, error) {
	var tokens *api.Tokens
	if f.tokensFile != "" {
		b, err := os.ReadFile(f.tokensFile)
		if err != nil {
			return nil, nil, &inputFileError{path: f.tokensFile, err: err}
		}
		if tokens, err = api.ParseTokens(b); err != nil {
			return nil, nil, &inputFileError{path: f.tokensFile, err: err}
		}
	}
	if f.tlsCert == "" {
		return tokens, nil, nil
	}
	cert, err := tls.LoadX509KeyPair(f.tlsCert, f.tlsKey)
	if err != nil {
		return nil, nil, &inputFileError{path: f.tlsCert + ", " + f.tlsKey, err: err}
	}
	return tokens, &cert, nil
}

// reload reads the tokens file and the certificate again (on SIGHUP) and,
// only if every file reads and parses, swaps them in for the calls and
// TLS handshakes that follow; otherwise what is in use stays and the
// error says why. Authentication and TLS cannot be turned on or off
// this way: that takes a restart.
func (f *serverSecurityFlags) reload(s *serverSecurity, log *slog.Logger) {
	if f.tokensFile == "" && f.tlsCert == "" {
		log.Info("SIGHUP: nothing to reload (no --tokens, no --tls-cert)")
		return
	}
	tokens, cert, err := f.read()
	if err != nil {
		log.Error("SIGHUP: reload refused; the tokens and certificate in use stay", "error", err)
		return
	}
	var attrs []any
	if tokens != nil {
		s.tokens.Replace(tokens)
		attrs = append(attrs, "tokens", tokens.Len())
	}
	if cert != nil {
		s.cert.Store(cert)
		attrs = append(attrs, "certificate", f.tlsCert)
	}
	log.Info("SIGHUP: reloaded", attrs...)
}

// apply sets the tokens and TLS on the server's options.
func (s *serverSecurity) apply(opt *api.Options) {
	opt.Tokens, opt.TLS = s.tokens, s.tls
}

// logStart says at start whether calls are authenticated and encrypted.
func (s *serverSecurity) logStart(log *slog.Logger, bound string) {
	switch {
	case s.tokens == nil && s.loopback:
		log.Warn("authentication is off (no --tokens): every user of this machine may submit and cancel any job; serving on loopback only", "address", bound)
	case s.tokens == nil:
		log.Warn("authentication is off (--insecure-no-auth): anyone who reaches the address may submit and cancel any job", "address", bound)
	default:
		log.Info("calls need a bearer token; health and reflection are open", "tokens", s.tokens.Len())
	}
	switch {
	case s.tls != nil:
		log.Info("serving TLS")
	case s.tokens != nil && !s.loopback:
		log.Warn("bearer tokens would cross the network unencrypted: serve TLS with --tls-cert and --tls-key, or terminate TLS in front of the server")
	}
}

// loopbackAddr reports whether host:port names a loopback address: a
// loopback IP (127.0.0.0/8, ::1) or "localhost". Any other name, and an
// empty host (all interfaces), is not: the check must not depend on what
// a resolver answers.
func loopbackAddr(addr string) bool {
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return false
	}
	if host == "localhost" {
		return true
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}

// clientSecurityFlags are the client subcommands' flags of TLS and the
// bearer token.
type clientSecurityFlags struct {
	cmd    string
	getenv func(string) string
	tls    bool
	tlsCA  string
	token  string
	envErr error // a malformed $DAMPFRONT_TLS, reported when dialling
}

func addClientSecurityFlags(fs *flagSet, e *env) *clientSecurityFlags {
	c := &clientSecurityFlags{cmd: fs.name, getenv: e.getenv}
	useTLS := false
	if v := e.getenv("DAMPFRONT_TLS"); v != "" {
		b, err := strconv.ParseBool(v)
		if err != nil {
			c.envErr = usagef(fs.name, "$DAMPFRONT_TLS=%q is not true or false", v)
		}
		useTLS = b
	}
	fs.BoolVar(&c.tls, "tls", useTLS, "connect with TLS, trusting the system's CA certificates ($DAMPFRONT_TLS)")
	fs.StringVar(&c.tlsCA, "tls-ca", envOr(e, "DAMPFRONT_TLS_CA", ""), "connect with TLS, trusting the CA certificates in this PEM `file` instead ($DAMPFRONT_TLS_CA)")
	// The default is not taken from $DAMPFRONT_TOKEN here, so that --help
	// never prints the token.
	fs.StringVar(&c.token, "token", "", "bearer `token` for a server that authenticates; $DAMPFRONT_TOKEN is better, as other users of the machine can read command lines")
	return c
}

// dialOptions are the transport credentials and bearer token of a
// connection to addr. The token is sent only over TLS or to a loopback
// address; anything else is a usage error, before any connection.
func (c *clientSecurityFlags) dialOptions(addr string) ([]grpc.DialOption, error) {
	if c.envErr != nil {
		return nil, c.envErr
	}
	token := strings.TrimSpace(c.token)
	if token == "" {
		token = strings.TrimSpace(c.getenv("DAMPFRONT_TOKEN"))
	}
	secure := c.tls || c.tlsCA != ""
	var opts []grpc.DialOption
	if secure {
		cfg := &tls.Config{MinVersion: tls.VersionTLS12}
		if c.tlsCA != "" {
			pem, err := os.ReadFile(c.tlsCA)
			if err != nil {
				return nil, &inputFileError{path: c.tlsCA, err: err}
			}
			cfg.RootCAs = x509.NewCertPool()
			if !cfg.RootCAs.AppendCertsFromPEM(pem) {
				return nil, &inputFileError{path: c.tlsCA, err: errors.New("no PEM certificate in the --tls-ca file")}
			}
		}
		opts = append(opts, grpc.WithTransportCredentials(credentials.NewTLS(cfg)))
	} else {
		opts = append(opts, grpc.WithTransportCredentials(insecure.NewCredentials()))
	}
	if token != "" {
		if !secure && !loopbackAddr(addr) {
			return nil, usagef(c.cmd, "refusing to send the bearer token unencrypted to %s, which is not a loopback address: connect with --tls-ca FILE or --tls", addr)
		}
		opts = append(opts, grpc.WithPerRPCCredentials(bearerToken{token: token, secure: secure}))
	}
	return opts, nil
}

// bearerToken puts "authorization: Bearer TOKEN" (RFC 6750, section
// 2.1) on every call. With secure set, gRPC refuses to send it over a
// connection without transport security.
type bearerToken struct {
	token  string
	secure bool
}

func (b bearerToken) GetRequestMetadata(context.Context, ...string) (map[string]string, error) {
	return map[string]string{"authorization": "Bearer " + b.token}, nil
}

func (b bearerToken) RequireTransportSecurity() bool { return b.secure }

var _ credentials.PerRPCCredentials = bearerToken{}
