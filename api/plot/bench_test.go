package plot

import (
	"io"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// BenchmarkWrite measures building and writing each chart, the cost of a
// chart served per request.
func BenchmarkWrite(b *testing.B) {
	charts := []struct {
		name  string
		build func() (*Figure, error)
	}{
		{"front/50", func() (*Figure, error) { return Front(testFront(50, 2), FrontOptions{}) }},
		{"front3/50", func() (*Figure, error) { return Front(testFront(50, 3), FrontOptions{}) }},
		{"dampers", func() (*Figure, error) { return DamperCurves(testCurves(), CurveOptions{}) }},
		{"road/4", func() (*Figure, error) { return RoadInput(testRoads(), RoadOptions{}) }},
		{"hypervolume/44", func() (*Figure, error) {
			return Hypervolume(testHistory(), []*pb.Objective{objGrip, objPlatform}, HypervolumeOptions{})
		}},
	}
	for _, c := range charts {
		for _, format := range []Format{SVG, PNG} {
			b.Run(c.name+"/"+string(format), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					fig, err := c.build()
					if err != nil {
						b.Fatal(err)
					}
					if err := fig.Write(io.Discard, format); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
