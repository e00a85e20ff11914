package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"dampfront/api/apitest"
)

// largeFront is the size of the seeded front: more than the 1,523
// solutions of the 3-objective job whose front no client could read
// (1,000 full solutions of some 5 kB each pass gRPC's default 4 MiB).
const largeFront = 3000

// TestFrontLargeEveryClient reads one front of largeFront solutions
// through every client: the command line's front in each format, the
// job page and its downloads, and the Python client (when Debian's
// python3 with grpc is there). All must succeed, and the files must be
// one schema: the CSVs equal byte for byte, the JSONs field for field.
func TestFrontLargeEveryClient(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithTimeout(context.Background(), 3*commandTimeout)
	defer cancel()
	dir := t.TempDir()
	db := filepath.Join(dir, "large.db")
	spec, err := apitest.DemoSpec(testdataPath("demo-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	name, err := apitest.SeedDatabase(ctx, db, spec, largeFront, 3)
	if err != nil {
		t.Fatal(err)
	}
	id := strings.TrimPrefix(name, "jobs/")
	pageFile := filepath.Join(dir, "http-addr")
	s := startServer(t, db, nil, "--http-addr", "127.0.0.1:0", "--http-addr-file", pageFile)
	base := "http://" + waitAddrFile(t, s, pageFile)

	table := mustRun(t, exitOK, nil, s.client("front", id, "--rows", "10")...).stdout
	if !strings.Contains(table, "3000 solutions") || !strings.Contains(table, "Showing 11 of 3000") {
		t.Errorf("front table:\n%.1500s", table)
	}
	csvs := map[string]string{"command line": mustRun(t, exitOK, nil, s.client("front", id, "--format", "csv")...).stdout}
	jsons := map[string]string{"command line": mustRun(t, exitOK, nil, s.client("front", id, "--format", "json")...).stdout}
	for _, p := range []string{"", "/front.svg", "/front.csv", "/front.json"} {
		code, body := httpGet(t, base+"/jobs/"+id+p)
		if code != http.StatusOK {
			t.Fatalf("page %s: %d %.500s", p, code, body)
		}
		switch p {
		case "/front.csv":
			csvs["page"] = body
		case "/front.json":
			jsons["page"] = body
		}
	}
	if py, ok := pythonClient(t); ok {
		for format, into := range map[string]map[string]string{"csv": csvs, "json": jsons} {
			out := filepath.Join(dir, "front."+format)
			cmd := exec.CommandContext(ctx, py[0], append(py[1:], "--addr", s.addr, "--job", name, "--format", format, "-o", out)...)
			cmd.Env = append(cleanEnv(), "PYTHONDONTWRITEBYTECODE=1")
			if b, err := cmd.CombinedOutput(); err != nil {
				t.Fatalf("python client --format %s: %v\n%s", format, err, b)
			}
			b, err := os.ReadFile(out)
			if err != nil {
				t.Fatal(err)
			}
			into["python client"] = string(b)
		}
	}

	rows, err := csv.NewReader(strings.NewReader(csvs["command line"])).ReadAll()
	if err != nil || len(rows) != largeFront+1 {
		t.Fatalf("command line CSV: %d rows, err %v; want %d and a header", len(rows), err, largeFront)
	}
	for client, c := range csvs {
		if c != csvs["command line"] {
			t.Errorf("the %s's CSV differs from the command line's", client)
		}
	}
	var want any
	if err := json.Unmarshal([]byte(jsons["command line"]), &want); err != nil {
		t.Fatal(err)
	}
	for client, j := range jsons {
		var got any
		if err := json.Unmarshal([]byte(j), &got); err != nil {
			t.Fatalf("%s JSON: %v", client, err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("the %s's JSON differs from the command line's", client)
		}
	}
}

// pythonClient is the command that runs api/clients/python's script with
// Debian's python3, if it has the grpc and protobuf modules.
func pythonClient(t *testing.T) ([]string, bool) {
	const python = "/usr/bin/python3"
	if err := exec.Command(python, "-c", "import grpc, google.protobuf").Run(); err != nil {
		t.Logf("no Python client check: %s lacks grpc or protobuf (Debian: apt-get install python3-grpcio python3-protobuf)", python)
		return nil, false
	}
	return []string{python, filepath.Join("..", "..", "api", "clients", "python", "dampfront_front.py")}, true
}
