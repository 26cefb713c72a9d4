package tui

import (
	"fmt"
	"math"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// holdupAt is the isothermal holdup time (s) of m's column and carrier at
// the program's initial temperature.
func holdupAt(m *methodfile.Method) (float64, error) {
	cond, err := conditions(m)
	if err != nil {
		return 0, err
	}
	return cond.HoldupTimeAt(m.Oven.InitialC + model.ZeroCelsius), nil
}

func conditions(m *methodfile.Method) (*model.Conditions, error) {
	car, err := m.ModelCarrier()
	if err != nil {
		return nil, err
	}
	return model.NewConditions(m.ModelColumn(), car)
}

// programHoldup is the holdup time (s) of m under its oven program, the
// one the status line shows (Result.HoldupTime): the time t at which an
// unretained solute has travelled the column, ∫₀ᵗ dt′ / tM(T(t′)) = 1,
// tM(T) being the isothermal holdup time (MODEL.md §4). The ramps are
// integrated by Simpson's rule in steps of at most 0.5 K.
func programHoldup(m *methodfile.Method) (float64, error) {
	cond, err := conditions(m)
	if err != nil {
		return 0, err
	}
	p := m.ModelProgram()
	inv := func(t float64) float64 { return 1 / cond.HoldupTimeAt(t) }
	var zeta, t float64 // distance travelled (fraction of the column), time
	hold := func(temp, dur float64) bool {
		g := inv(temp)
		if zeta+g*dur >= 1 {
			t += (1 - zeta) / g
			return true
		}
		zeta += g * dur
		t += dur
		return false
	}
	if hold(p.Initial, p.InitialHold) {
		return t, nil
	}
	prev := p.Initial
	for _, r := range p.Ramps {
		n := max(1, int(math.Ceil(math.Abs(r.Final-prev)/0.5)))
		dT := (r.Final - prev) / float64(n)
		dt := dT / r.Rate
		for i := 0; i < n; i++ {
			a := prev + float64(i)*dT
			ga, gm, gb := inv(a), inv(a+dT/2), inv(a+dT)
			dz := dt * (ga + 4*gm + gb) / 6
			if zeta+dz >= 1 {
				// within the step the speed barely changes: linear
				t += dt * (1 - zeta) / dz
				return t, nil
			}
			zeta += dz
			t += dt
		}
		if hold(r.Final, r.Hold) {
			return t, nil
		}
		prev = r.Final
	}
	hold(prev, math.Inf(1))
	return t, nil
}

// keepHoldup gives m, whose gas, pressure mode or column just changed, the
// column flow (constant flow) or inlet gauge pressure (constant pressure)
// under which its holdup time under the program is tm s, the time the
// status line showed before the change. The holdup time falls
// monotonically with either, so bisection on a log scale finds the exact
// value; the value set is the keypad step (limits.flow_step_ml_min or
// limits.pressure_step_kpa, at the precision the file keeps) on either side
// of it whose holdup time is nearer tm. It returns what it set and the
// holdup time that gives, for the status line.
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
	step, digits, unit, what := m.Limits.FlowStepMLMin, settingsSaved["carrier.flow_ml_min"], "mL/min", "flow"
	if pressure {
		lo, hi = 0.1, 10000 // kPa gauge
		step, digits, unit, what = m.Limits.PressureStepKPa, settingsSaved["carrier.inlet_kpa"], "kPa", "inlet"
	}
	if !(step > 0) {
		step = math.Pow(10, -float64(digits))
	}
	at := func(v float64) float64 {
		set(v)
		t, err := programHoldup(m)
		if err != nil {
			return math.NaN()
		}
		return t
	}
	if !(at(lo) >= tm && at(hi) <= tm) {
		m.Carrier = was
		return "", fmt.Errorf("no %s gives the holdup time %.3f min", map[bool]string{true: "inlet pressure", false: "flow"}[pressure], tm/60)
	}
	for i := 0; i < 60; i++ {
		mid := math.Sqrt(lo * hi)
		if at(mid) > tm {
			lo = mid
		} else {
			hi = mid
		}
	}
	exact := math.Sqrt(lo * hi)
	// the keypad steps on either side (never zero), at the file's precision
	best, bestT := 0.0, math.Inf(1)
	// (methodfile.OnStep, the one keypad rounding: the nearest step and
	// the one beyond it on the exact value's other side)
	near := methodfile.OnStep(exact, step)
	other := methodfile.OnStep(near+step, step)
	if near > exact {
		other = methodfile.OnStep(near-step, step)
	}
	for _, v := range []float64{near, other} {
		v = round(v, digits)
		if !(v > 0) {
			v = round(step, digits)
		}
		if t := at(v); math.Abs(t-tm) < math.Abs(bestT-tm) {
			best, bestT = v, t
		}
	}
	set(best)
	shown := fmtNum(best, digits, digits)
	if math.Abs(bestT-tm) < 0.0005*60 {
		return fmt.Sprintf("%s %s %s keeps the holdup time %.3f min", what, shown, unit, bestT/60), nil
	}
	return fmt.Sprintf("%s %s %s gives the holdup time %.3f min (%.3f before; the nearest in %s %s steps)",
		what, shown, unit, bestT/60, tm/60, trimNum(step), unit), nil
}
