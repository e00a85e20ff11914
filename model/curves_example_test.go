package model_test

import (
	"fmt"

	"dampfront/model"
)

// The damper curves at the component for a setup given as damping ratios
// at the wheel: the low-speed slopes ζ c_crit / MR², the knees and the
// high-speed slopes, tabulated from -0.2 to 0.2 m/s (rebound negative).
func ExampleDamperCurves() {
	car, setup := exampleCar(), exampleSetup()
	curves, err := model.DamperCurves(&car, &setup, model.Adjustment{}, 0.2, 5)
	if err != nil {
		fmt.Println(err)
		return
	}
	fl := curves[0] // front left
	fmt.Printf("slopes bump %.2f, rebound %.2f N s/mm\n", fl.BumpSlope/1000, fl.ReboundSlope/1000)
	for i, v := range fl.Velocity {
		fmt.Printf("%4.0f mm/s %6.0f N\n", 1000*v, fl.Force[i])
	}
	// Output:
	// slopes bump 9.14, rebound 14.12 N s/mm
	// -200 mm/s  -1935 N
	// -100 mm/s  -1158 N
	//    0 mm/s      0 N
	//  100 mm/s    662 N
	//  200 mm/s   1074 N
}
