package methodfile

import (
	"math"
	"strconv"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/format"
)

// Step is the oven's (or the carrier's) keypad step for a value of kind k:
// temp_step_c, rate_step_c_min, hold_step_min, flow_step_ml_min or
// pressure_step_kpa, with the defaults where the limit is unset.
func (l Limits) Step(k model.ValueKind) float64 {
	or := func(x, def float64) float64 {
		if x > 0 {
			return x
		}
		return def
	}
	switch k {
	case model.InitialTemp, model.RampFinal:
		return or(l.TempStepC, DefaultTempStepC)
	case model.RampRate:
		return or(l.RateStepCMin, DefaultRateStepCMin)
	case model.InitialHold, model.RampHold:
		return or(l.HoldStepMin, DefaultHoldStepMin)
	case model.CarrierFlow:
		return or(l.FlowStepMLMin, DefaultFlowStepMLMin)
	case model.InletPressure:
		return or(l.PressureStepKPa, DefaultPressureStepKPa)
	}
	return 0
}

// OnStep is x on the keypad step (rounded to the nearest multiple, without
// binary noise): what the instrument takes.
func OnStep(x, step float64) float64 {
	if !(step > 0) || math.IsNaN(x) || math.IsInf(x, 0) {
		return x
	}
	v, _ := strconv.ParseFloat(format.OnStep(x, step), 64)
	return v
}
