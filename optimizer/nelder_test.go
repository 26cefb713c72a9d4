package optimizer

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/optimize"
)

// The optimizer's Nelder–Mead (nelder.go) visits exactly the points, in the
// same order, that gonum's optimize.Minimize with optimize.NelderMead does
// under the settings the optimizer uses (one evaluation at a time,
// FunctionConverge{1e-4, 1e-9, 60}, an evaluation limit, a Status
// callback), bit for bit, on smooth, flat-topped and noisy functions, up to
// convergence, up to the limit and up to a stop; held after some
// evaluations and taken up again, it still does.
func TestNelderMeadAsGonum(t *testing.T) {
	rosen := func(x []float64) float64 {
		s := 0.0
		for i := 0; i+1 < len(x); i++ {
			a, b := 1-x[i], x[i+1]-x[i]*x[i]
			s += a*a + 100*b*b
		}
		return s
	}
	// clamped like the optimizer's mapping, with a plateau and a step (ties)
	clamped := func(x []float64) float64 {
		s := 0.0
		for i, v := range x {
			c := clamp01(v)
			d := c - 0.3 - 0.05*float64(i)
			s += d * d
		}
		if s < 0.01 {
			s = 0.01
		}
		return math.Floor(s*1e4) / 1e4
	}
	bumpy := func(x []float64) float64 {
		s := 0.0
		for i, v := range x {
			s += (v-0.2*float64(i))*(v-0.2*float64(i)) + 0.05*math.Sin(17*v)
		}
		return s + 1e7*math.Max(0, x[0]-0.9) // a penalty wall as for infeasible programs
	}
	fns := []struct {
		name string
		f    func([]float64) float64
	}{{"rosenbrock", rosen}, {"clamped", clamped}, {"bumpy", bumpy}}
	for _, fn := range fns {
		for _, dim := range []int{1, 2, 5, 8, 11} {
			for _, size := range []float64{0.25, 0.05} {
				for _, limit := range []int{7, 300, 2000} {
					for _, stopAt := range []int{0, 40} {
						name := fmt.Sprintf("%s/dim%d/size%g/limit%d/stop%d", fn.name, dim, size, limit, stopAt)
						x0 := make([]float64, dim)
						for i := range x0 {
							x0[i] = 0.1 + 0.07*float64(i)
						}
						// gonum
						var want [][]float64
						gStatus := func() (optimize.Status, error) {
							if stopAt > 0 && len(want) >= stopAt {
								return optimize.Failure, fmt.Errorf("stopped")
							}
							return optimize.NotTerminated, nil
						}
						prob := optimize.Problem{Func: func(x []float64) float64 {
							want = append(want, append([]float64(nil), x...))
							return fn.f(x)
						}, Status: gStatus}
						settings := &optimize.Settings{
							FuncEvaluations: limit,
							Converger:       &optimize.FunctionConverge{Absolute: 1e-4, Relative: 1e-9, Iterations: 60},
							Concurrent:      1,
						}
						optimize.Minimize(prob, append([]float64(nil), x0...), settings, &optimize.NelderMead{SimplexSize: size})
						for _, hold := range []int{0, 1, 25} {
							var got [][]float64
							nm := newNelderMead(func(x []float64) float64 {
								got = append(got, append([]float64(nil), x...))
								return fn.f(x)
							}, func() bool { return stopAt > 0 && len(got) >= stopAt }, x0, size, limit)
							if hold > 0 {
								nm.run(hold)
								if !nm.done() && len(got) != hold {
									t.Fatalf("%s: held after %d evaluations, not %d", name, len(got), hold)
								}
							}
							nm.run(limit)
							if !nm.done() {
								t.Fatalf("%s: not done after run to the limit", name)
							}
							if len(got) != len(want) {
								t.Fatalf("%s hold %d: %d evaluations, gonum %d", name, hold, len(got), len(want))
							}
							for i := range want {
								for j := range want[i] {
									if math.Float64bits(got[i][j]) != math.Float64bits(want[i][j]) {
										t.Fatalf("%s hold %d: evaluation %d differs: %v, gonum %v", name, hold, i, got[i], want[i])
									}
								}
							}
						}
					}
				}
			}
		}
	}
}
