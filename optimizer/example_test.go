package optimizer_test

import (
	"bytes"
	"context"
	"fmt"
	"log"
	"math"

	"dampfront/optimizer"
)

// zdt1 is ZDT1 of Zitzler, Deb & Thiele (2000) with 30 genes: f1 = x1,
// g = 1 + 9 Σ x_i / 29, f2 = g (1 − √(f1/g)).
type zdt1 struct{}

func (zdt1) Bounds() []optimizer.Bound {
	b := make([]optimizer.Bound, 30)
	for i := range b {
		b[i] = optimizer.Bound{Lo: 0, Hi: 1}
	}
	return b
}
func (zdt1) NumObjectives() int  { return 2 }
func (zdt1) NumConstraints() int { return 0 }
func (zdt1) Evaluate(x, obj, _ []float64) error {
	var s float64
	for _, v := range x[1:] {
		s += v
	}
	g := 1 + 9*s/29
	obj[0], obj[1] = x[0], g*(1-math.Sqrt(x[0]/g))
	return nil
}

func Example() {
	s := optimizer.DefaultSettings(30) // Deb et al. (2002): N = 100, p_c = 0.9, η = 20, p_m = 1/n
	s.Generations = 100
	s.ReferencePoint = []float64{1, 1}
	st, err := optimizer.New(zdt1{}, s)
	if err != nil {
		log.Fatal(err)
	}
	if err := st.Run(context.Background()); err != nil {
		log.Fatal(err)
	}
	h := st.History()
	fmt.Printf("generation %d, hypervolume %.2f (analytic front 0.67)\n", st.Generation(), h[len(h)-1].Hypervolume)
	// Output:
	// generation 100, hypervolume 0.65 (analytic front 0.67)
}

// A study stopped after 30 generations and restored from its checkpoint
// ends exactly where an uninterrupted one does.
func ExampleRestore() {
	s := optimizer.DefaultSettings(30)
	s.Generations = 60
	ctx := context.Background()

	whole, _ := optimizer.New(zdt1{}, s)
	_ = whole.Run(ctx)
	want, _ := whole.Checkpoint()

	part, _ := optimizer.New(zdt1{}, s)
	_, _ = part.Step(ctx, 30)
	saved, _ := part.Checkpoint()

	s.Workers = 2 // the resumed run may use more workers
	resumed, err := optimizer.Restore(zdt1{}, s, saved)
	if err != nil {
		log.Fatal(err)
	}
	_ = resumed.Run(ctx)
	got, _ := resumed.Checkpoint()
	fmt.Println("identical:", bytes.Equal(got, want))
	// Output:
	// identical: true
}
