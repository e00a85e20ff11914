package optimizer

import "slices"

// NonDominatedSort partitions the points into fronts by the fast
// non-dominated sort of Deb et al. (2002), §III-A: F1 holds the points no
// other point dominates, F2 those dominated only by points of F1, and so on.
// obj[i] is the objective vector of point i; viol[i] is its total
// constraint violation (TotalViolation), and viol == nil means every point
// is feasible, which makes the domination plain Pareto domination. The
// fronts are returned in order, each as ascending indices into obj.
//
// It costs O(M n²) comparisons for n points of M objectives. It panics with
// ErrShape if viol is not nil and not of length len(obj), or the objective
// vectors differ in length.
func NonDominatedSort(obj [][]float64, viol []float64) [][]int {
	n := len(obj)
	if viol != nil && len(viol) != n {
		panic(ErrShape)
	}
	v := func(i int) float64 {
		if viol == nil {
			return 0
		}
		return viol[i]
	}
	// dom[p*n+q] is set when p dominates q (q ∈ S_p in Deb 2002); each pair
	// is compared once.
	dom := make([]bool, n*n)
	count := make([]int, n) // n_p: number of points dominating p
	for p := 0; p < n; p++ {
		for q := p + 1; q < n; q++ {
			switch compareConstrained(obj[p], v(p), obj[q], v(q)) {
			case -1:
				dom[p*n+q] = true
				count[q]++
			case 1:
				dom[q*n+p] = true
				count[p]++
			}
		}
	}

	var fronts [][]int
	var current []int
	for p := 0; p < n; p++ {
		if count[p] == 0 {
			current = append(current, p)
		}
	}
	for len(current) > 0 {
		fronts = append(fronts, current)
		var next []int
		for _, p := range current {
			row := dom[p*n : (p+1)*n]
			for q, d := range row {
				if d {
					count[q]--
					if count[q] == 0 {
						next = append(next, q)
					}
				}
			}
		}
		slices.Sort(next)
		current = next
	}
	return fronts
}
