package model_test

import (
	"fmt"

	"dampfront/model"
)

// The balanced point of a small two-objective front (grip in % of static
// load, platform in mm): both objectives span 1 to 9, and the third point,
// at scaled (0.375, 0.25), is nearest the middle (0.5, 0.5).
func ExampleBalanced() {
	front := [][]float64{{1, 9}, {2, 5}, {4, 3}, {7, 2}, {9, 1}}
	i, err := model.Balanced(front)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(i, front[i])
	// Output: 2 [4 3]
}
