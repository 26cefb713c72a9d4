package tui

import (
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// holdupAt is the holdup time (s) of m's column and carrier at the
// program's initial temperature.
func holdupAt(m *methodfile.Method) (float64, error) {
	car, err := m.ModelCarrier()
	if err != nil {
		return 0, err
	}
	cond, err := model.NewConditions(m.ModelColumn(), car)
	if err != nil {
		return 0, err
	}
	return cond.HoldupTimeAt(m.Oven.InitialC + model.ZeroCelsius), nil
}

// keepHoldup gives m, whose gas or pressure mode just changed, the column
// flow (constant flow) or inlet gauge pressure (constant pressure) under
// which its holdup time at the initial temperature is tm s, as before the
// change: the holdup time falls monotonically with either, so bisection on
// a log scale finds it. The value is rounded to what the file keeps
// (0.01 mL/min, 0.1 kPa). It returns what it set, for the status line.
func keepHoldup(m *methodfile.Method, tm float64) (string, error) {
	pressure := m.Carrier.Mode == model.ConstantPressure
	was := m.Carrier
	set := func(v float64) {
		if pressure {
			m.Carrier.InletKPa = v
		} else {
			m.Carrier.FlowMLMin = v
		}
	}
	lo, hi := 0.001, 100.0 // mL/min
	if pressure {
		lo, hi = 0.1, 10000 // kPa gauge
	}
	at := func(v float64) float64 {
		set(v)
		t, err := holdupAt(m)
		if err != nil {
			return math.NaN()
		}
		return t
	}
	if !(at(lo) >= tm && at(hi) <= tm) {
		m.Carrier = was
		return "", fmt.Errorf("no %s gives the holdup time %.2f min", map[bool]string{true: "inlet pressure", false: "flow"}[pressure], tm/60)
	}
	for i := 0; i < 80; i++ {
		mid := math.Sqrt(lo * hi)
		if at(mid) > tm {
			lo = mid
		} else {
			hi = mid
		}
	}
	v := math.Sqrt(lo * hi)
	if pressure {
		v = round(v, 1)
		set(v)
		return fmt.Sprintf("inlet %s kPa keeps the holdup time %.2f min at %s °C", fmtNum(v, 1, 1), tm/60, trimNum(m.Oven.InitialC)), nil
	}
	v = math.Max(0.01, round(v, 2))
	set(v)
	return fmt.Sprintf("flow %s mL/min keeps the holdup time %.2f min at %s °C", fmtNum(v, 2, 2), tm/60, trimNum(m.Oven.InitialC)), nil
}
