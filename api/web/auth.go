package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"

	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/metadata"
	"google.golang.org/grpc/status"

	pb "dampfront/api/gen/dampfront/v1"
)

// tokenCookie names the cookie that the login form sets.
const tokenCookie = "token"

// requestToken is the bearer token of a request: that of an
// "Authorization: Bearer TOKEN" header (the scheme case-insensitive, RFC
// 7235 section 2.1), else the token cookie's value, else "".
func requestToken(r *http.Request) string {
	if a := r.Header.Get("Authorization"); a != "" {
		scheme, token, ok := strings.Cut(a, " ")
		if ok && strings.EqualFold(scheme, "Bearer") {
			return strings.TrimSpace(token)
		}
	}
	if c, err := r.Cookie(tokenCookie); err == nil {
		return c.Value
	}
	return ""
}

// withToken sends token with the service calls of ctx as the
// "authorization" metadata, as the API expects it (RFC 6750 section 2.1).
func withToken(ctx context.Context, token string) context.Context {
	if token == "" {
		return ctx
	}
	return metadata.AppendToOutgoingContext(ctx, "authorization", "Bearer "+token)
}

// cookieSafe reports whether s can be a cookie value as it is (RFC 6265
// section 4.1.1): the tokens the API makes are base64url, which is.
func cookieSafe(s string) bool {
	return s != "" && printableNoBackslash(s) && !strings.ContainsAny(s, `",;`)
}

// sameOrigin refuses a form posted from another site: a browser sends
// Origin with every POST, and it must name this host.
func sameOrigin(r *http.Request) bool {
	o := r.Header.Get("Origin")
	if o == "" || o == "null" {
		return o == "" // no Origin: not a browser's cross-site form
	}
	u, err := url.Parse(o)
	return err == nil && u.Host == r.Host
}

// localPath returns next when it is a path of this site, "/" otherwise,
// so that the login form cannot send its reader elsewhere.
func localPath(next string) string {
	if !sitePath(next) {
		return "/"
	}
	return next
}

// sitePath reports whether next is a path of this site and nothing a
// browser could read as another host. A browser drops tabs and newlines
// from a URL, strips leading and trailing control characters and spaces,
// and reads a backslash as a slash (WHATWG URL Standard, "basic URL
// parser"), so "/\t/host" and "/\host" both become "//host", a
// scheme-relative URL to another site. So: printable ASCII only, no
// backslash, no scheme or host, and a path that starts with one slash and
// has no empty segment or backslash or control character, also once
// percent-decoded. The page's own URLs (RequestURI, escaped) all pass.
func sitePath(next string) bool {
	if !printableNoBackslash(next) {
		return false
	}
	u, err := url.Parse(next)
	if err != nil || u.Scheme != "" || u.Host != "" || u.User != nil || u.Opaque != "" {
		return false
	}
	return strings.HasPrefix(next, "/") && strings.HasPrefix(u.Path, "/") &&
		!strings.Contains(u.Path, "//") && !strings.ContainsFunc(u.Path, func(r rune) bool {
		return r < 0x20 || r == 0x7f || r == '\\'
	})
}

// printableNoBackslash reports whether s is all printable ASCII other
// than the space and the backslash.
func printableNoBackslash(s string) bool {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c <= 0x20 || c >= 0x7f || c == '\\' {
			return false
		}
	}
	return true
}

type loginView struct {
	pageView
	Next    string
	Problem string
}

func (h *Handler) loginForm(w http.ResponseWriter, r *http.Request) {
	h.render(w, r, http.StatusOK, "login", &loginView{pageView: pageView{Title: "Log in"}, Next: localPath(r.URL.Query().Get("next"))})
}

// login checks the token with one ListJobs call and, unless the service
// refuses it as unknown, sets it as a cookie for the session: HttpOnly,
// SameSite=Strict, Secure over TLS.
func (h *Handler) login(w http.ResponseWriter, r *http.Request) {
	if !sameOrigin(r) {
		h.fail(w, r, http.StatusForbidden, "the login form was posted from another site")
		return
	}
	token := strings.TrimSpace(r.PostFormValue("token"))
	next := localPath(r.PostFormValue("next"))
	v := &loginView{pageView: pageView{Title: "Log in"}, Next: next}
	if !cookieSafe(token) {
		v.Problem = "Paste the whole token, as 'dampfront token new' printed it."
		h.render(w, r, http.StatusBadRequest, "login", v)
		return
	}
	ctx, cancel := context.WithTimeout(r.Context(), h.opt.RequestTimeout)
	defer cancel()
	_, err := h.client.ListJobs(withToken(ctx, token), &pb.ListJobsRequest{PageSize: 1, View: pb.JobView_JOB_VIEW_BASIC})
	if status.Code(err) == codes.Unauthenticated {
		v.Problem = status.Convert(err).Message()
		h.render(w, r, http.StatusUnauthorized, "login", v)
		return
	}
	http.SetCookie(w, &http.Cookie{Name: tokenCookie, Value: token, Path: "/", HttpOnly: true,
		Secure: r.TLS != nil, SameSite: http.SameSiteStrictMode})
	http.Redirect(w, r, next, http.StatusSeeOther)
}

func (h *Handler) logout(w http.ResponseWriter, r *http.Request) {
	if !sameOrigin(r) {
		h.fail(w, r, http.StatusForbidden, "the logout form was posted from another site")
		return
	}
	http.SetCookie(w, &http.Cookie{Name: tokenCookie, Value: "", Path: "/", MaxAge: -1, HttpOnly: true,
		Secure: r.TLS != nil, SameSite: http.SameSiteStrictMode})
	http.Redirect(w, r, "/", http.StatusSeeOther)
}
