package api

import (
	"os/exec"
	"strings"
	"testing"
)

// The layers of DEVELOPERS.md, as imports: what each package below the
// API may not depend on, directly or through another package. The rule
// is the project's own (its design: protobuf never leaks below api;
// jobs knows neither the optimiser nor protobuf; nothing calls back up).
var layerRules = []struct {
	pkg       string
	forbidden []string // import path prefixes
}{
	{"dampfront/model", []string{"dampfront/", "google.golang.org/protobuf", "google.golang.org/grpc"}},
	{"dampfront/model/tradeunit", []string{"dampfront/optimizer", "dampfront/jobs", "dampfront/api", "dampfront/cmd", "google.golang.org/protobuf", "google.golang.org/grpc"}},
	{"dampfront/optimizer", []string{"dampfront/", "google.golang.org/protobuf", "google.golang.org/grpc"}},
	{"dampfront/jobs", []string{"dampfront/optimizer", "dampfront/jobs/study", "dampfront/api", "dampfront/cmd", "google.golang.org/protobuf", "google.golang.org/grpc"}},
	{"dampfront/jobs/study", []string{"dampfront/api", "dampfront/cmd", "google.golang.org/protobuf", "google.golang.org/grpc"}},
}

// TestLayers lists the dependencies of each package below the API with
// `go list -deps` and refuses any that its layer forbids.
func TestLayers(t *testing.T) {
	t.Parallel()
	for _, r := range layerRules {
		out, err := exec.Command("go", "list", "-deps", "-f", "{{.ImportPath}}", r.pkg).Output()
		if err != nil {
			t.Fatalf("go list -deps %s: %v", r.pkg, err)
		}
		deps := strings.Fields(string(out))
		if len(deps) < 2 {
			t.Fatalf("go list -deps %s listed %v", r.pkg, deps)
		}
		for _, d := range deps {
			if d == r.pkg {
				continue
			}
			for _, f := range r.forbidden {
				if d == strings.TrimSuffix(f, "/") || strings.HasPrefix(d, f) {
					t.Errorf("%s depends on %s, which its layer forbids (%s)", r.pkg, d, f)
				}
			}
		}
	}
}
