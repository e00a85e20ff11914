package web

import (
	"net/http"
	"strings"
	"testing"

	"google.golang.org/protobuf/proto"

	"dampfront/api"
)

// TestJobPageRobust: the page of a robust job (testdata/robust-job.yaml,
// cut to a few generations and 2 nodes per range, 8 cars) says how its
// front was made and shows each objective's nominal, sd and worst in the
// solutions table and each solution's sheet, and its CSV download
// carries them.
func TestJobPageRobust(t *testing.T) {
	t.Parallel()
	spec := specFile(t, "robust-job.yaml")
	spec.Search.PopulationSize, spec.Search.Generations = 8, 2
	spec.Search.Seed = proto.Uint64(11)
	spec.Uncertainty.Nodes = 2
	b := setup(t, 1, api.Options{})
	job := b.finish(t, b.submit(t, spec).GetName())
	id := job.GetJobId()
	res, body := get(t, b, "/jobs/"+id)
	wantStatus(t, "robust job page", res, body, http.StatusOK)
	for _, want := range []string{`id="robust">Robust front: every setup evaluated on 8 uncertain cars (Gauss-Legendre, 2 nodes per range)`,
		"mean &#43; 1 sd", "Grip nominal", "Grip sd", "Platform worst"} {
		if !strings.Contains(body, want) {
			t.Errorf("the robust job's page lacks %q", want)
		}
	}
	res, sheet := get(t, b, "/jobs/"+id+"/solutions/0/sheet.html")
	wantStatus(t, "sheet", res, sheet, http.StatusOK)
	for _, want := range []string{"Robust front: every setup evaluated on 8 uncertain cars", "grip, nominal car", "platform, sd over the uncertain cars", "grip, worst over the uncertain cars"} {
		if !strings.Contains(sheet, want) {
			t.Errorf("the robust solution's sheet lacks %q", want)
		}
	}
	res, csv := get(t, b, "/jobs/"+id+"/front.csv")
	wantStatus(t, "front.csv", res, csv, http.StatusOK)
	if header, _, _ := strings.Cut(csv, "\n"); !strings.HasSuffix(header, ",balanced,grip_rel_nominal,grip_rel_sd,grip_rel_worst,platform_m_nominal,platform_m_sd,platform_m_worst") {
		t.Errorf("front.csv header %q lacks the robust columns", header)
	}
}
