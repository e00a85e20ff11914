package model_test

import (
	"fmt"

	"dampfront/model"
)

// The time-domain check of a setup: the nonlinear car on a synthesised
// road (seeded) against the statistically linearised answer, with the
// verdict of each metric and of the whole (within 3 statistical errors).
func ExampleVerify() {
	road := []model.RoadCase{{Name: "fast sweepers", Speed: 55, Gd0: 2e-6}}
	rep, err := model.Verify(exampleCar(), road, exampleSetup(), model.VerifyOptions{
		Time: model.TimeOptions{Duration: 30}, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	c := &rep.Cases[0]
	r, _ := c.Row("ride_height_sd_m[front]")
	fmt.Printf("front ride height sd: %.1f mm linear, %.1f mm nonlinear: %v\n", 1000*r.Frequency, 1000*r.Time, r.Verdict())
	fmt.Println("setup:", rep.Verdict())
	// Output:
	// front ride height sd: 0.9 mm linear, 0.9 mm nonlinear: holds
	// setup: holds
}
