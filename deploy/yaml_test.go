package deploy

import (
	"bytes"
	"fmt"
	"math"
	"net"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"sigs.k8s.io/yaml"
)

// Reading the YAML files as generic maps (sigs.k8s.io/yaml, as the
// binary reads its own inputs), with small typed getters that fail the
// test on a missing or mistyped field.

type obj = map[string]any

// readYAMLDocs parses every document of a YAML file (documents are
// separated by "---" lines).
func readYAMLDocs(t *testing.T, path string) []obj {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out []obj
	for i, doc := range regexp.MustCompile(`(?m)^---\s*$`).Split(string(b), -1) {
		if strings.TrimSpace(stripComments(doc)) == "" {
			continue
		}
		var m obj
		if err := yaml.Unmarshal([]byte(doc), &m); err != nil {
			t.Fatalf("%s, document %d: %v", path, i+1, err)
		}
		out = append(out, m)
	}
	return out
}

func stripComments(doc string) string {
	var b bytes.Buffer
	for _, l := range strings.Split(doc, "\n") {
		if !strings.HasPrefix(strings.TrimSpace(l), "#") {
			b.WriteString(l + "\n")
		}
	}
	return b.String()
}

// at walks m along the keys; ok is false when a key is missing or a
// value on the way is not a map.
func at(m obj, keys ...string) (any, bool) {
	var v any = m
	for _, k := range keys {
		mm, ok := v.(obj)
		if !ok {
			return nil, false
		}
		if v, ok = mm[k]; !ok {
			return nil, false
		}
	}
	return v, true
}

func mustAt(t *testing.T, where string, m obj, keys ...string) any {
	t.Helper()
	v, ok := at(m, keys...)
	if !ok {
		t.Fatalf("%s: no %s", where, strings.Join(keys, "."))
	}
	return v
}

func str(t *testing.T, where string, m obj, keys ...string) string {
	t.Helper()
	v := mustAt(t, where, m, keys...)
	s, ok := v.(string)
	if !ok {
		t.Fatalf("%s: %s is %v (%T), not a string", where, strings.Join(keys, "."), v, v)
	}
	return s
}

func num(t *testing.T, where string, m obj, keys ...string) float64 {
	t.Helper()
	v := mustAt(t, where, m, keys...)
	x, ok := v.(float64)
	if !ok {
		t.Fatalf("%s: %s is %v (%T), not a number", where, strings.Join(keys, "."), v, v)
	}
	return x
}

func list(t *testing.T, where string, m obj, keys ...string) []any {
	t.Helper()
	v := mustAt(t, where, m, keys...)
	l, ok := v.([]any)
	if !ok {
		t.Fatalf("%s: %s is %v (%T), not a list", where, strings.Join(keys, "."), v, v)
	}
	return l
}

func object(t *testing.T, where string, m obj, keys ...string) obj {
	t.Helper()
	v := mustAt(t, where, m, keys...)
	o, ok := v.(obj)
	if !ok {
		t.Fatalf("%s: %s is %v (%T), not a mapping", where, strings.Join(keys, "."), v, v)
	}
	return o
}

func strings_(t *testing.T, where string, l []any) []string {
	t.Helper()
	out := make([]string, len(l))
	for i, v := range l {
		s, ok := v.(string)
		if !ok {
			t.Fatalf("%s: item %d is %v (%T), not a string", where, i, v, v)
		}
		out[i] = s
	}
	return out
}

// portOf returns the port of a host:port listen address.
func portOf(t *testing.T, where, addr string) int {
	t.Helper()
	_, p, err := net.SplitHostPort(addr)
	if err != nil {
		t.Fatalf("%s: listen address %q: %v", where, addr, err)
	}
	n, err := strconv.Atoi(p)
	if err != nil || n <= 0 || n > 65535 {
		t.Fatalf("%s: listen address %q has no fixed port", where, addr)
	}
	return n
}

// reachableHost fails t when a container's listen address is loopback,
// which nothing outside the container can reach.
func reachableHost(t *testing.T, where, addr string) {
	t.Helper()
	h, _, _ := net.SplitHostPort(addr)
	if ip := net.ParseIP(h); h == "localhost" || (ip != nil && ip.IsLoopback()) {
		t.Errorf("%s: listens on %q, loopback inside the container: nothing outside can reach it", where, addr)
	}
}

// duration parses a flag value as the binary does (time.ParseDuration).
func duration(t *testing.T, where, s string) time.Duration {
	t.Helper()
	d, err := time.ParseDuration(s)
	if err != nil {
		t.Fatalf("%s: %q is not a duration: %v", where, s, err)
	}
	return d
}

// quantity parses a Kubernetes resource quantity of the forms these
// manifests use: plain or with the suffixes m, k, M, G, Ki, Mi, Gi
// (Kubernetes API reference, "Quantity").
func quantity(t *testing.T, where string, v any) float64 {
	t.Helper()
	var s string
	switch v := v.(type) {
	case float64:
		return v
	case string:
		s = v
	default:
		t.Fatalf("%s: quantity %v (%T)", where, v, v)
	}
	mult := map[string]float64{"m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9, "Ki": 1 << 10, "Mi": 1 << 20, "Gi": 1 << 30}
	for _, suf := range []string{"Ki", "Mi", "Gi", "m", "k", "M", "G"} {
		if n, ok := strings.CutSuffix(s, suf); ok {
			x, err := strconv.ParseFloat(n, 64)
			if err != nil {
				t.Fatalf("%s: quantity %q: %v", where, s, err)
			}
			return x * mult[suf]
		}
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(x) {
		t.Fatalf("%s: quantity %q: %v", where, s, err)
	}
	return x
}

// composeDuration parses a compose duration ("90s", "1m30s"), which is
// Go's syntax (Compose specification, "Extension: durations").
func composeDuration(t *testing.T, where string, v any) time.Duration {
	t.Helper()
	s, ok := v.(string)
	if !ok {
		t.Fatalf("%s: duration %v (%T)", where, v, v)
	}
	return duration(t, where, s)
}

func fmtList(l []string) string { return fmt.Sprintf("%q", l) }
