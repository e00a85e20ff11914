// Package web is dampfront's read-only job page: server-rendered HTML
// (html/template) with the charts of package plot inline as SVG, and a
// few lines of plain JavaScript for sorting the solutions table, showing
// a solution's damper curves and refreshing a running job's progress.
// There is no front-end build; the templates, the style sheet and the
// script are embedded in the binary.
//
// # Pages
//
//	GET /                                      jobs: state, progress, labels, times; filters by state and label
//	GET /jobs/{id}                             a job: live progress, the Pareto front, the solutions, damper curves
//	GET /jobs/{id}/progress.json               the job's state and progress, polled by the job page
//	GET /jobs/{id}/front.csv                   the front, one row per solution, SI, the unit in each column's name
//	GET /jobs/{id}/front.json                  the front as GetFront returns it (protobuf JSON mapping, SI)
//	GET /jobs/{id}/front.svg                   the front chart
//	GET /jobs/{id}/solutions/{index}/curves.svg  a solution's damper curves at the component
//	GET, POST /login, POST /logout             the token cookie, when the API asks for tokens
//
// Every page carries the caution of the linear model.
//
// # Data path and authentication
//
// The page reads only through the DampfrontService (GetJob, ListJobs,
// GetFront), never the store: a Client is a gRPC client of the service,
// in a serving process usually the in-process connection of Local over
// the same job engine. The caller's bearer token, from an
// "Authorization: Bearer TOKEN" header or the "token" cookie that the
// login form sets, goes with each call as the "authorization" metadata,
// so the service's own authentication and roles decide what the page
// shows: a call refused as Unauthenticated shows the login form (401), one
// refused as PermissionDenied says why (403). Without tokens on the
// server every page is open.
package web
