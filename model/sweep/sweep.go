// Package sweep varies one or two program (or carrier) values of a method
// and records the minimum resolution, critical pair and run time at each
// step: a window diagram in the sense of Laub & Purnell (1975).
package sweep

import (
	"errors"
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// Point is one step of a sweep.
type Point struct {
	Value, Value2 float64
	Valid         bool
	Reason        string  // why the program is not valid
	MinRs         float64 // NaN when no pair counts
	Critical      [2]string
	NotEluted     []string // targets that elute after the program (the goal is then not met)
	RunTime       float64  // min
	CycleTime     float64  // min
}

// set returns a copy of m with the value v set to x.
func set(m *methodfile.Method, v model.ProgramValue, x float64) (*methodfile.Method, error) {
	c := m.Clone()
	if err := c.SetValue(v, x); err != nil {
		return nil, err
	}
	return c, nil
}

// Check reports whether v can be varied in m.
func Check(m *methodfile.Method, v model.ProgramValue) error {
	_, err := set(m, v, 1)
	return err
}

// Steps are n values evenly spaced from a to b (n ≥ 2), the ends exact.
func Steps(a, b float64, n int) []float64 {
	if n < 2 {
		return []float64{a}
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	out[n-1] = b
	return out
}

type evaluator struct {
	m      *methodfile.Method
	sys    *model.System
	sysKey string
	res    model.Result
}

func (e *evaluator) point(c *methodfile.Method) Point {
	p := Point{MinRs: math.NaN()}
	if err := c.Validate(); err != nil {
		var fe *methodfile.Error
		if errors.As(err, &fe) {
			p.Reason = fe.Key + ": " + fe.Msg
		} else {
			p.Reason = err.Error()
		}
		return p
	}
	key := fmt.Sprint(c.Carrier, c.Column)
	if e.sys == nil || key != e.sysKey {
		sys, err := c.System()
		if err != nil {
			p.Reason = err.Error()
			return p
		}
		e.sys, e.sysKey = sys, key
	}
	if err := e.sys.Simulate(c.ModelProgram(), &e.res); err != nil {
		p.Reason = err.Error()
		return p
	}
	p.Valid = true
	p.RunTime, p.CycleTime = e.res.RunTime/60, e.res.CycleTime/60
	p.NotEluted = e.sys.NotElutedTargets(&e.res)
	if e.res.Critical >= 0 {
		p.MinRs = e.res.MinResolution
		cp := e.res.Pairs[e.res.Critical]
		p.Critical = [2]string{e.sys.Compounds[cp.First].Name, e.sys.Compounds[cp.Second].Name}
	}
	return p
}

// One varies name over values; progress (may be nil) is told the steps done.
func One(m *methodfile.Method, name model.ProgramValue, values []float64, progress func(done, total int)) ([]Point, error) {
	if err := Check(m, name); err != nil {
		return nil, err
	}
	e := &evaluator{m: m}
	var out []Point
	for i, v := range values {
		c, _ := set(m, name, v)
		p := e.point(c)
		p.Value = v
		out = append(out, p)
		if progress != nil {
			progress(i+1, len(values))
		}
	}
	return out, nil
}

// Two varies name over values and name2 over values2: a map of the
// minimum resolution, row by row of values2.
func Two(m *methodfile.Method, name model.ProgramValue, values []float64, name2 model.ProgramValue, values2 []float64, progress func(done, total int)) ([][]Point, error) {
	if err := Check(m, name); err != nil {
		return nil, err
	}
	if err := Check(m, name2); err != nil {
		return nil, err
	}
	if name == name2 {
		return nil, errors.New("the two values to vary must differ")
	}
	e := &evaluator{m: m}
	total := len(values) * len(values2)
	grid := make([][]Point, len(values2))
	done := 0
	for j, v2 := range values2 {
		for _, v := range values {
			c, _ := set(m, name, v)
			c, _ = set(c, name2, v2)
			p := e.point(c)
			p.Value, p.Value2 = v, v2
			grid[j] = append(grid[j], p)
			done++
			if progress != nil {
				progress(done, total)
			}
		}
	}
	return grid, nil
}
