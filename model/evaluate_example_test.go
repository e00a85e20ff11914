package model_test

import (
	"fmt"

	"dampfront/model"
)

// Evaluate a setup on an ISO 8608 road: the car's tyre-load variation,
// ride-height variation and jacking with statistically linearised
// dampers, in SI (printed here in trade units).
func ExampleEvaluator_Evaluate() {
	road := []model.RoadCase{{Name: "fast sweepers", Speed: 55, Gd0: 2e-6}} // class A/B, 55 m/s
	ev, err := model.NewEvaluator(exampleCar(), road, model.EvaluatorOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	var res model.Result
	if err := ev.Evaluate(exampleSetup(), &res); err != nil {
		fmt.Println(err)
		return
	}
	m := res.Cases[0]
	fmt.Printf("front-left tyre load sd: %.0f N (%.1f %% of static)\n", m.TyreLoadSD[0], 100*m.TyreLoadSD[0]/m.StaticTyreLoad[0])
	fmt.Printf("ride height sd front/rear: %.2f/%.2f mm\n", 1000*m.RideHeightSD[0], 1000*m.RideHeightSD[1])
	fmt.Printf("front ride-height shift (jacking): %+.2f mm\n", 1000*m.RideHeightShift[0])
	// Output:
	// front-left tyre load sd: 196 N (3.6 % of static)
	// ride height sd front/rear: 0.90/0.98 mm
	// front ride-height shift (jacking): -0.37 mm
}
