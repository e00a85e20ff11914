package main

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	"net"
	"net/url"
	"os"
	"os/exec"
	"os/user"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgxpool"
)

// PostgreSQL for the process tests. The tests that need it are skipped
// only when DAMPFRONT_TEST_DATABASE_URL is unset (CI sets it, .ci/run);
// each gets a database of its own, created through that URL and dropped
// at its end, so they run in parallel with each other and with the rest.
// The test that restarts PostgreSQL itself runs a throwaway cluster of
// its own, as .ci/run does.

// testDatabaseURLEnv names the variable of the shared test server.
const testDatabaseURLEnv = "DAMPFRONT_TEST_DATABASE_URL"

// pgTimeout bounds one administrative statement or pg_ctl run.
const pgTimeout = 60 * time.Second

// randomName is prefix and 12 random hexadecimal digits, a fresh database
// name.
func randomName(t *testing.T, prefix string) string {
	t.Helper()
	var b [6]byte
	if _, err := rand.Read(b[:]); err != nil {
		t.Fatal(err)
	}
	return prefix + hex.EncodeToString(b[:])
}

// testPostgresURL returns the URL of a new, empty database on the server
// of DAMPFRONT_TEST_DATABASE_URL, dropped when the test ends; it skips
// the test when the variable is unset.
func testPostgresURL(t *testing.T) string {
	t.Helper()
	base := os.Getenv(testDatabaseURLEnv)
	if base == "" {
		t.Skipf("%s is not set; PostgreSQL tests skipped", testDatabaseURLEnv)
	}
	return createDatabase(t, base)
}

// createDatabase creates a database with a random name on the server of
// the admin URL base and returns its URL; the cleanup drops it, closing
// any connection a killed process left behind.
func createDatabase(t *testing.T, base string) string {
	t.Helper()
	name := randomName(t, "dampfront_test_")
	adminExec(t, base, "CREATE DATABASE "+name)
	t.Cleanup(func() {
		ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
		defer cancel()
		conn, err := pgx.Connect(ctx, base)
		if err != nil {
			t.Errorf("drop database %s: %v", name, err)
			return
		}
		defer conn.Close(ctx)
		if _, err := conn.Exec(ctx, "DROP DATABASE IF EXISTS "+name+" WITH (FORCE)"); err != nil {
			t.Errorf("drop database %s: %v", name, err)
		}
	})
	u, err := url.Parse(base)
	if err != nil {
		t.Fatalf("parse %s: %v", testDatabaseURLEnv, err)
	}
	u.Path = "/" + name
	return u.String()
}

// adminExec runs one statement on the database of URL u.
func adminExec(t *testing.T, u, stmt string) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
	defer cancel()
	conn, err := pgx.Connect(ctx, u)
	if err != nil {
		t.Fatalf("connect to PostgreSQL for %q: %v", stmt, err)
	}
	defer conn.Close(ctx)
	if _, err := conn.Exec(ctx, stmt); err != nil {
		t.Fatalf("%s: %v", stmt, err)
	}
}

// pgPool opens the test's own connections to the database at u, for
// reading the tables; they are closed when the test ends.
func pgPool(t *testing.T, u string) *pgxpool.Pool {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
	defer cancel()
	pool, err := pgxpool.New(ctx, u)
	if err == nil {
		err = pool.Ping(ctx)
	}
	if err != nil {
		t.Fatalf("connect to %s: %v", u, err)
	}
	t.Cleanup(pool.Close)
	return pool
}

// pgCluster is a throwaway PostgreSQL cluster of one test, on 127.0.0.1
// at a free port, with its data and socket in a temporary directory.
type pgCluster struct {
	t    *testing.T
	bin  string // directory of initdb and pg_ctl
	dir  string
	port int
	cred *syscall.Credential // the postgres user's, when the test runs as root
}

// startCluster initialises and starts a cluster as .ci/run does
// (initdb -A trust; pg_ctl start with listen_addresses=127.0.0.1); the
// cleanup stops it and removes its files. The test is skipped when
// DAMPFRONT_TEST_DATABASE_URL is unset (PostgreSQL tests are not wanted)
// or no initdb is installed.
func startCluster(t *testing.T) *pgCluster {
	t.Helper()
	if os.Getenv(testDatabaseURLEnv) == "" {
		t.Skipf("%s is not set; PostgreSQL tests skipped", testDatabaseURLEnv)
	}
	bin := findPGBin()
	if bin == "" {
		t.Skip("no PostgreSQL initdb found (looked in /usr/lib/postgresql/*/bin and $PATH)")
	}
	c := &pgCluster{t: t, bin: bin}
	dir, err := os.MkdirTemp("", "dampfront-test-pg-")
	if err != nil {
		t.Fatal(err)
	}
	c.dir = dir
	t.Cleanup(func() { _ = os.RemoveAll(dir) })
	if os.Geteuid() == 0 {
		// initdb refuses to run as root; run the cluster as postgres.
		u, err := user.Lookup("postgres")
		if err != nil {
			t.Skipf("running as root and there is no postgres user to own the cluster: %v", err)
		}
		uid, _ := strconv.Atoi(u.Uid)
		gid, _ := strconv.Atoi(u.Gid)
		c.cred = &syscall.Credential{Uid: uint32(uid), Gid: uint32(gid)}
		if err := os.Chown(dir, uid, gid); err != nil {
			t.Fatal(err)
		}
	}
	c.run("initdb", "-D", c.data(), "-A", "trust", "-U", "postgres")
	// The port is free when chosen; another process could take it before
	// PostgreSQL binds it, so try a few.
	for attempt := 0; ; attempt++ {
		c.port = freePort(t)
		err := c.ctl("start", "-o", fmt.Sprintf("-c listen_addresses=127.0.0.1 -p %d -k %s", c.port, c.dir))
		if err == nil {
			break
		}
		if attempt == 2 {
			t.Fatalf("pg_ctl start: %v\n%s", err, c.log())
		}
	}
	t.Cleanup(func() { _ = c.ctl("stop", "-m", "immediate") })
	return c
}

// findPGBin is the directory of the newest installed initdb, or "".
func findPGBin() string {
	dirs, _ := filepath.Glob("/usr/lib/postgresql/*/bin")
	sort.Slice(dirs, func(i, j int) bool { return pgVersion(dirs[i]) < pgVersion(dirs[j]) })
	for i := len(dirs) - 1; i >= 0; i-- {
		if _, err := os.Stat(filepath.Join(dirs[i], "initdb")); err == nil {
			return dirs[i]
		}
	}
	if p, err := exec.LookPath("initdb"); err == nil {
		return filepath.Dir(p)
	}
	return ""
}

// pgVersion is the major version in a /usr/lib/postgresql/N/bin path.
func pgVersion(dir string) int {
	n, _ := strconv.Atoi(filepath.Base(filepath.Dir(dir)))
	return n
}

// freePort is a TCP port of 127.0.0.1 that was free a moment ago.
func freePort(t *testing.T) int {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	return l.Addr().(*net.TCPAddr).Port
}

func (c *pgCluster) data() string { return filepath.Join(c.dir, "data") }
func (c *pgCluster) log() string {
	b, _ := os.ReadFile(filepath.Join(c.dir, "log"))
	return string(b)
}

// run runs a PostgreSQL program as the cluster's owner and fails the
// test if it fails.
func (c *pgCluster) run(prog string, args ...string) {
	c.t.Helper()
	if out, err := c.command(prog, args...).CombinedOutput(); err != nil {
		c.t.Fatalf("%s %s: %v\n%s", prog, strings.Join(args, " "), err, out)
	}
}

func (c *pgCluster) command(prog string, args ...string) *exec.Cmd {
	ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
	c.t.Cleanup(cancel)
	cmd := exec.CommandContext(ctx, filepath.Join(c.bin, prog), args...)
	cmd.Dir = c.dir
	if c.cred != nil {
		cmd.SysProcAttr = &syscall.SysProcAttr{Credential: c.cred}
	}
	return cmd
}

// ctl runs pg_ctl action on the cluster, waiting for it to complete.
func (c *pgCluster) ctl(action string, args ...string) error {
	all := append([]string{"-D", c.data(), "-l", filepath.Join(c.dir, "log"), "-w", "-t", "50", action}, args...)
	out, err := c.command("pg_ctl", all...).CombinedOutput()
	if err != nil {
		return fmt.Errorf("%w: %s", err, out)
	}
	return nil
}

// mustCtl is ctl that fails the test.
func (c *pgCluster) mustCtl(action string, args ...string) {
	c.t.Helper()
	if err := c.ctl(action, args...); err != nil {
		c.t.Fatalf("pg_ctl %s: %v\n%s", action, err, c.log())
	}
}

// adminURL is the URL of the cluster's postgres database.
func (c *pgCluster) adminURL() string {
	return fmt.Sprintf("postgres://postgres@127.0.0.1:%d/postgres?sslmode=disable", c.port)
}

// jobRow is what the fault tests read of a dampfront_job row.
type jobRow struct {
	id, state, errMsg, lease string
	partial                  bool
	generation, generations  int
	slices                   int
	spec                     []byte
}

// readJobs is queryJobs that fails the test on an error.
func readJobs(t *testing.T, pool *pgxpool.Pool) map[string]jobRow {
	t.Helper()
	all, err := queryJobs(pool)
	if err != nil {
		t.Fatalf("read jobs: %v", err)
	}
	return all
}

// queryJobs reads every job row, by ID.
func queryJobs(pool *pgxpool.Pool) (map[string]jobRow, error) {
	ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
	defer cancel()
	rows, err := pool.Query(ctx, `SELECT id, state, error, lease, partial, generation, generations, slices, spec FROM dampfront_job`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	out := map[string]jobRow{}
	for rows.Next() {
		var j jobRow
		var partial int64
		if err := rows.Scan(&j.id, &j.state, &j.errMsg, &j.lease, &partial, &j.generation, &j.generations, &j.slices, &j.spec); err != nil {
			return nil, err
		}
		j.partial = partial != 0
		out[j.id] = j
	}
	return out, rows.Err()
}

// readJob is one job's row; ok is false when it cannot be read (the
// database may be restarting).
func readJob(pool *pgxpool.Pool, id string) (j jobRow, ok bool) {
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	var partial int64
	err := pool.QueryRow(ctx, `SELECT id, state, error, lease, partial, generation, generations, slices FROM dampfront_job WHERE id = $1`, id).
		Scan(&j.id, &j.state, &j.errMsg, &j.lease, &partial, &j.generation, &j.generations, &j.slices)
	j.partial = partial != 0
	return j, err == nil
}

// waitJobsEnded polls until every job is in a terminal state, within
// faultJobsTimeout, and returns their rows. A failed read is tried again
// (the database may be restarting).
func waitJobsEnded(t *testing.T, pool *pgxpool.Pool, ids []string) map[string]jobRow {
	t.Helper()
	deadline := time.Now().Add(faultJobsTimeout)
	for {
		all, err := queryJobs(pool)
		if err != nil && time.Now().After(deadline) {
			t.Fatalf("read jobs: %v", err)
		}
		ended := 0
		for _, id := range ids {
			if s := all[id].state; s == "succeeded" || s == "failed" || s == "cancelled" {
				ended++
			}
		}
		if ended == len(ids) {
			return all
		}
		if time.Now().After(deadline) {
			t.Fatalf("%d of %d jobs ended within %v: %+v", ended, len(ids), faultJobsTimeout, all)
		}
		time.Sleep(100 * time.Millisecond)
	}
}

// sliceRow is one River job of kind dampfront_slice.
type sliceRow struct {
	slice    int
	state    string
	attempts int
}

// readSlices returns the River slices of each job, by job ID, in slice
// order.
func readSlices(t *testing.T, pool *pgxpool.Pool) map[string][]sliceRow {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
	defer cancel()
	rows, err := pool.Query(ctx, `SELECT args->>'job_id', (args->>'slice')::int, state::text, attempt
		FROM river_job WHERE kind = 'dampfront_slice' ORDER BY id`)
	if err != nil {
		t.Fatalf("read slices: %v", err)
	}
	defer rows.Close()
	out := map[string][]sliceRow{}
	for rows.Next() {
		var id string
		var s sliceRow
		if err := rows.Scan(&id, &s.slice, &s.state, &s.attempts); err != nil {
			t.Fatalf("read slices: %v", err)
		}
		out[id] = append(out[id], s)
	}
	if err := rows.Err(); err != nil {
		t.Fatalf("read slices: %v", err)
	}
	for _, ss := range out {
		slices.SortStableFunc(ss, func(a, b sliceRow) int { return a.slice - b.slice })
	}
	return out
}

// checkSucceededOnce checks that the database holds exactly the jobs ids,
// each succeeded with all its generations, and that each job's River
// slices are one chain 1, 2, ..., k, all completed: none lost (a slice
// left queued or running), none duplicated (two slices with one number,
// or a slice of an unknown job). It returns the slices and the slice
// attempts beyond the first (runs again after a kill) summed over jobs.
func checkSucceededOnce(t *testing.T, pool *pgxpool.Pool, ids []string) (slicesRun, reruns int) {
	t.Helper()
	all := readJobs(t, pool)
	if len(all) != len(ids) {
		t.Errorf("the database holds %d jobs, %d were submitted", len(all), len(ids))
	}
	bySlice := readSlices(t, pool)
	for _, id := range ids {
		j, ok := all[id]
		switch {
		case !ok:
			t.Errorf("job %s is lost: not in the database", id)
			continue
		case j.state != "succeeded" || j.errMsg != "" || j.partial || j.generation != j.generations || j.generations == 0:
			t.Errorf("job %s: state %s, error %q, partial %v, generation %d of %d; want succeeded with all generations",
				id, j.state, j.errMsg, j.partial, j.generation, j.generations)
		}
		ss := bySlice[id]
		if len(ss) == 0 {
			t.Errorf("job %s has no slices", id)
		}
		for k, s := range ss {
			if s.slice != k+1 || s.state != "completed" {
				t.Errorf("job %s: slices %+v; want one chain 1, 2, ... all completed", id, ss)
				break
			}
			slicesRun++
			reruns += s.attempts - 1
		}
		delete(bySlice, id)
	}
	for id, ss := range bySlice {
		t.Errorf("slices %+v of job %s, which was not submitted", ss, id)
	}
	return slicesRun, reruns
}

// runningSliceOf returns the job whose slice River shows running in the
// worker process of node with PID pid, or "".
func runningSliceOf(pool *pgxpool.Pool, node string, pid int) string {
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	var id string
	err := pool.QueryRow(ctx, `SELECT args->>'job_id' FROM river_job
		WHERE kind = 'dampfront_slice' AND state = 'running'
		AND attempted_by[array_length(attempted_by, 1)] LIKE $1 LIMIT 1`,
		node+"/"+strconv.Itoa(pid)+"/%").Scan(&id)
	if err != nil {
		return ""
	}
	return id
}

// checkpointGeneration is the generation of a job's last checkpoint, 0
// when it has none (or it cannot be read).
func checkpointGeneration(pool *pgxpool.Pool, id string) int {
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	var g int
	_ = pool.QueryRow(ctx, `SELECT generation FROM dampfront_checkpoint WHERE job_id = $1`, id).Scan(&g)
	return g
}

// waitTakenOver polls until job id has a slice run with another lease
// than lease, or has ended, and returns when that was seen.
func waitTakenOver(pool *pgxpool.Pool, id, lease string, timeout time.Duration) (time.Time, bool) {
	deadline := time.Now().Add(timeout)
	for time.Now().Before(deadline) {
		if j, ok := readJob(pool, id); ok && (j.lease != lease || j.state == "succeeded" || j.state == "failed" || j.state == "cancelled") {
			return time.Now(), true
		}
		time.Sleep(pollInterval)
	}
	return time.Time{}, false
}

// nextGeneration polls until job id stores a generation other than gen,
// or ends, and returns the generation then stored (gen after timeout).
func nextGeneration(pool *pgxpool.Pool, id string, gen int, timeout time.Duration) int {
	deadline := time.Now().Add(timeout)
	for time.Now().Before(deadline) {
		if j, ok := readJob(pool, id); ok && (j.generation != gen || j.state == "succeeded" || j.state == "failed" || j.state == "cancelled") {
			return j.generation
		}
		time.Sleep(pollInterval)
	}
	return gen
}

// readSlicesOpen returns the River slices not yet completed, by job.
func readSlicesOpen(t *testing.T, pool *pgxpool.Pool) map[string][]sliceRow {
	t.Helper()
	out := readSlices(t, pool)
	for id, ss := range out {
		open := slices.DeleteFunc(ss, func(s sliceRow) bool {
			return s.state == "completed" || s.state == "cancelled" || s.state == "discarded"
		})
		if len(open) == 0 {
			delete(out, id)
		} else {
			out[id] = open
		}
	}
	return out
}
