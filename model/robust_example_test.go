package model_test

import (
	"fmt"

	"dampfront/model"
)

// A robust problem: the same setup on the car with 10-100 kg of fuel and
// tyres ±10 %, 2 Gauss-Legendre nodes per range (4 cars), its grip and
// platform as the mean over them, beside the nominal car's.
func ExampleNewRobustProblem() {
	car := exampleCar()
	road := []model.RoadCase{{Name: "fast sweepers", Speed: 55, Gd0: 2e-6}}
	design := model.DesignSpace{Ratios: [4]model.Range{{0.2, 1.4}, {0.2, 1.4}, {0.2, 1.4}, {0.2, 1.4}}, Base: exampleSetup()}
	ev, err := model.NewEvaluator(car, road, model.EvaluatorOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	nominal, err := model.NewProblem(ev, design, model.DefaultObjectives(), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	u := model.Uncertainty{FuelMass: &model.Range{Min: 10, Max: 100}, TyreRateScaleAll: &model.Range{Min: 0.9, Max: 1.1}, Nodes: 2}
	u = u.WithDefaults()
	if err := u.Validate(&car); err != nil {
		fmt.Println(err)
		return
	}
	points := u.UncertainPoints()
	evals := make([]*model.Evaluator, len(points))
	for j := range points {
		cj, err := points[j].Apply(&car)
		if err == nil {
			// The same dampers on every car: ratios of the nominal car's critical damping.
			evals[j], err = model.NewEvaluator(cj, road, model.EvaluatorOptions{DampingReference: &car})
		}
		if err != nil {
			fmt.Println(err)
			return
		}
	}
	robust, err := model.NewRobustProblem(nominal, &u, points, evals)
	if err != nil {
		fmt.Println(err)
		return
	}
	x := design.Encode(exampleSetup())
	nom, rob := make([]float64, 2), make([]float64, 2)
	var fig model.RobustFigures
	if err := nominal.EvaluateGenes(x, nom, nil); err != nil {
		fmt.Println(err)
		return
	}
	if err := robust.EvaluateRobust(design.Decode(x), rob, nil, &fig); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d cars per setup\n", robust.RobustPoints())
	fmt.Printf("grip: nominal %.2f %%, mean %.2f %% (sd %.2f %%)\n", 100*nom[0], 100*rob[0], 100*fig.SD[0])
	fmt.Printf("platform: nominal %.3f mm, mean %.3f mm, worst %.3f mm\n", 1000*nom[1], 1000*rob[1], 1000*fig.Worst[1])
	// Output:
	// 4 cars per setup
	// grip: nominal 3.55 %, mean 3.48 % (sd 0.11 %)
	// platform: nominal 1.003 mm, mean 1.019 mm, worst 1.043 mm
}
