package main

import (
	"bytes"
	"errors"
	"regexp"
	"strings"
	"testing"
	"time"
	"unicode"

	"google.golang.org/protobuf/types/known/timestamppb"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestPlain checks the escaping of text printed from stored or user data.
// ESC (U+001B) and CSI (U+009B) start ECMA-48 control sequences; BEL ends
// an operating-system command; U+202E and U+2066 are bidirectional
// formatting characters (Unicode Standard Annex #9, table 1); tab and
// newline would break a table's columns and rows.
func TestPlain(t *testing.T) {
	t.Parallel()
	cases := []struct{ in, want string }{
		{"Quillon GT, demo tracks", "Quillon GT, demo tracks"},
		{"Ashgrove Ring – fast sweepers, 55 m/s", "Ashgrove Ring – fast sweepers, 55 m/s"},
		{"GT\x1b[2J\x1b]0;owned\x07", `GT\x1b[2J\x1b]0;owned\a`},
		{"a\tb\nc\rd", `a\tb\nc\rd`},
		{"x\u009b31m", `x\u009b31m`},
		{"abc\u202edef\u2066", `abc\u202edef\u2066`},
		{"\x7f\x00", `\x7f\x00`},
	}
	for _, c := range cases {
		if got := plain(c.in); got != c.want {
			t.Errorf("plain(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	if got, want := plainLines("a\x1b\n  b\x07"), "a\\x1b\n  b\\a"; got != want {
		t.Errorf("plainLines = %q, want %q", got, want)
	}
}

// TestPrintedJobHasNoControls prints a job whose name, labels, car, road
// cases and error hold terminal controls (as a job stored before submit
// refused them would) through every text view of a job, and checks that
// no control character other than the line ends reaches the terminal.
func TestPrintedJobHasNoControls(t *testing.T) {
	t.Parallel()
	const evil = "x\x1b]0;owned\x07\x1b[2J\u009b1m\u202e\t"
	j := &pb.Job{
		Name: "jobs/0123", JobId: "0123", DisplayName: evil, Labels: map[string]string{"car": evil},
		State: pb.JobState_JOB_STATE_FAILED, ErrorMessage: "failed on " + evil, CreateTime: timestamppb.Now(),
		Spec: &pb.JobSpec{Vehicle: &pb.Vehicle{Name: evil}, RoadCases: []*pb.RoadCase{{Name: evil}}},
	}
	views := map[string]func(w *bytes.Buffer) error{
		"list":  func(w *bytes.Buffer) error { return writeJobList(w, []*pb.Job{j}) },
		"get":   func(w *bytes.Buffer) error { return writeJob(w, j) },
		"front": func(w *bytes.Buffer) error { return writeFrontTable(w, &frontData{job: j, front: &pb.Front{}}, 0, "") },
		"watch": func(w *bytes.Buffer) error { _, err := w.WriteString(finalLine(j) + "\n"); return err },
		"error": func(w *bytes.Buffer) error {
			e := &env{stdout: new(bytes.Buffer), stderr: w}
			finish(e, "get", errors.New("bad "+evil+"\n  more "+evil))
			return nil
		},
	}
	for name, write := range views {
		var b bytes.Buffer
		if err := write(&b); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		out := b.String()
		if i := strings.IndexFunc(out, func(r rune) bool {
			return r != '\n' && (unicode.IsControl(r) || unicode.Is(unicode.Bidi_Control, r))
		}); i >= 0 {
			t.Errorf("%s prints a control character at byte %d:\n%q", name, i, out)
		}
		if !strings.Contains(out, `x\x1b]0;owned\a`) {
			t.Errorf("%s does not show the escaped name:\n%q", name, out)
		}
	}
}

// TestListTimesHaveZone checks that the list's creation time reads back
// to the same instant: it carries its offset from UTC.
func TestListTimesHaveZone(t *testing.T) {
	t.Parallel()
	created := time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC)
	var b bytes.Buffer
	if err := writeJobList(&b, []*pb.Job{{JobId: "0123", CreateTime: timestamppb.New(created)}}); err != nil {
		t.Fatal(err)
	}
	m := regexp.MustCompile(`\d{4}-\d\d-\d\d \d\d:\d\d:\d\d [+-]\d\d:\d\d`).FindString(b.String())
	got, err := time.Parse("2006-01-02 15:04:05 -07:00", m)
	if err != nil || !got.Equal(created) {
		t.Errorf("list shows the creation time as %q (%v, %v), want %v with its offset:\n%s", m, got, err, created, b.String())
	}
}

// TestListMarksInfeasible checks that the list's state column says when a
// succeeded job's front meets none of its constraints, as get does.
func TestListMarksInfeasible(t *testing.T) {
	t.Parallel()
	var b bytes.Buffer
	jobs := []*pb.Job{
		{JobId: "0001", State: pb.JobState_JOB_STATE_SUCCEEDED, Infeasible: true},
		{JobId: "0002", State: pb.JobState_JOB_STATE_SUCCEEDED},
	}
	if err := writeJobList(&b, jobs); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(b.String(), "\n")
	if len(lines) < 3 || !strings.Contains(lines[1], "succeeded, infeasible") || strings.Contains(lines[2], "infeasible") {
		t.Errorf("list does not mark only the infeasible job:\n%s", b.String())
	}
}

// TestListShowsRefinement checks that the list's state column says how
// far a running job's refinement is (as of its last checkpoint), and
// nothing of it once the job has ended.
func TestListShowsRefinement(t *testing.T) {
	t.Parallel()
	var b bytes.Buffer
	rs := &pb.RefinementSummary{Points: 586, PointsChecked: 212, InProgress: true}
	jobs := []*pb.Job{
		{JobId: "0001", State: pb.JobState_JOB_STATE_RUNNING, RefinementSummary: rs},
		{JobId: "0002", State: pb.JobState_JOB_STATE_CANCELLED, RefinementSummary: rs},
	}
	if err := writeJobList(&b, jobs); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(b.String(), "\n")
	if len(lines) < 3 || !strings.Contains(lines[1], "running, refining 212/586") || strings.Contains(lines[2], "refining") {
		t.Errorf("list does not show the running job's refinement alone:\n%s", b.String())
	}
}
