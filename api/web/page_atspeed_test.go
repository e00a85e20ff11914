package web

import (
	"context"
	"net/http"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"dampfront/api"
	"dampfront/api/apitest"
	pb "dampfront/api/gen/dampfront/v1"
)

// TestJobPageAtSpeed checks the car-at-speed section of the job page on
// the example job with reference points (testdata/floor-job.yaml): it
// names the solution shown, has a row per road case with the balance at
// speed and a row per reference point and case, and shows the stored
// figures of that solution in trade units (balance in per cent,
// ground contact in per cent with three significant digits).
func TestJobPageAtSpeed(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
	defer cancel()
	db := filepath.Join(t.TempDir(), "jobs.db")
	spec, err := apitest.DemoSpec(filepath.Join("..", "..", "testdata", "floor-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	name, err := apitest.SeedDatabase(ctx, db, spec, 6, 5)
	if err != nil {
		t.Fatal(err)
	}
	id := strings.TrimPrefix(name, "jobs/")
	b := setupOn(t, db, 0, api.Options{})

	res, body := get(t, b, "/jobs/"+id+"?solution=3")
	wantStatus(t, "job page", res, body, http.StatusOK)
	section := regexp.MustCompile(`(?s)<section id="at-speed" data-solution="3">(.*?)</section>`).FindStringSubmatch(body)
	if section == nil {
		t.Fatalf("no car-at-speed section on the page:\n%.2000s", body)
	}
	front, err := b.client.GetFront(ctx, &pb.GetFrontRequest{Job: name, PageSize: 100, View: pb.SolutionView_SOLUTION_VIEW_FULL})
	if err != nil {
		t.Fatal(err)
	}
	sol := solutionAt(front.GetFront(), 3)
	if sol == nil {
		t.Fatal("no solution 3 in the seeded front")
	}
	m := sol.GetCaseMetrics()[0]
	p := m.GetReferencePoints()[0]
	for _, want := range []string{
		"The car at speed, solution 3", "Balance at speed", "Downforce sd", "Ground contact",
		"Ashgrove Ring, fast sweepers", "splitter left corner", "plank front",
		strconv.FormatFloat(100*m.GetAero().GetBalanceAtSpeed(), 'f', 2, 64),
		strconv.FormatFloat(1000*p.GetHeightAtSpeedM(), 'f', 2, 64),
		strconv.FormatFloat(100*p.GetContactProbability(), 'g', 3, 64),
	} {
		if !strings.Contains(section[1], want) {
			t.Errorf("the car-at-speed section lacks %q:\n%s", want, section[1])
		}
	}
	if n := strings.Count(section[1], "<tr>"); n != 2+len(spec.GetRoadCases())*(1+len(spec.GetVehicle().GetReferencePoints())) {
		t.Errorf("%d table rows, want two headers, one per road case and one per point and case", n)
	}
}
