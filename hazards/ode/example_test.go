package ode_test

import (
	"fmt"
	"math"

	"chargeward/hazards/ode"
)

// A ball dropped from 2 m: the integration stops where the height crosses zero, at √(2h/g).
func ExampleSolver_Integrate() {
	const g = 9.80665
	fall := func(t float64, y, dy []float64) { dy[0], dy[1] = y[1], -g }
	floor := ode.Event{G: func(t float64, y []float64) float64 { return y[0] }, Dir: -1}
	y := []float64{2, 0} // height (m), velocity (m/s)
	res, err := ode.NewSolver(2).Integrate(fall, 0, 10, y, []ode.Event{floor}, ode.Options{RelTol: 1e-9})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("hit the floor at t = %.6f s (closed form %.6f s), speed %.4f m/s\n", res.T, math.Sqrt(2*2/g), -y[1])
	// Output: hit the floor at t = 0.638660 s (closed form 0.638660 s), speed 6.2631 m/s
}
