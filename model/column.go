package model

import (
	"errors"
	"fmt"
	"math"
)

// Physical constants and reference conditions (MODEL.md §2–3).
const (
	GasConstant        = 8.314462618 // R, J/(mol·K)
	StandardAtmosphere = 101325.0    // Pa
	ZeroCelsius        = 273.15      // K
	FlowRefTemp        = 298.15      // Tn, K: reference temperature of a flow rate
	FlowRefPressure    = 101325.0    // pn, Pa: reference pressure of a flow rate
	DefaultRefTemp     = 373.15      // T_ref, K (100 °C)
	DefaultDs          = 1.0e-9      // stationary-phase diffusivity, m²/s
)

// Column is a wall-coated open-tubular column. Lengths are in metres,
// temperatures in kelvin.
type Column struct {
	Length   float64 // L, m
	Diameter float64 // d_tube, internal diameter of the tubing, m
	Film     float64 // df, film thickness, m
	MaxTemp  float64 // Tmax, K: no program may exceed it
	// StationaryDiffusivity is D_s in m²/s; zero means DefaultDs.
	StationaryDiffusivity float64
	// PlateHeightFactor is φ of MODEL.md §5; zero means 1.
	PlateHeightFactor float64
}

// Validate reports the first physical impossibility of the column.
func (c Column) Validate() error {
	switch {
	case !(c.Length > 0) || math.IsInf(c.Length, 0):
		return errors.New("model: column length must be positive")
	case !(c.Diameter > 0) || math.IsInf(c.Diameter, 0):
		return errors.New("model: column diameter must be positive")
	case !(c.Film > 0) || math.IsInf(c.Film, 0):
		return errors.New("model: film thickness must be positive")
	case c.Film >= c.Diameter/2:
		return errors.New("model: film thicker than the column radius")
	case !(c.MaxTemp > 0) || math.IsInf(c.MaxTemp, 0):
		return errors.New("model: column maximum temperature must be above absolute zero")
	case c.StationaryDiffusivity < 0 || math.IsNaN(c.StationaryDiffusivity) || math.IsInf(c.StationaryDiffusivity, 0):
		return errors.New("model: stationary-phase diffusivity must be positive")
	case c.PlateHeightFactor < 0 || math.IsNaN(c.PlateHeightFactor) || math.IsInf(c.PlateHeightFactor, 0):
		return errors.New("model: plate-height factor must be positive")
	}
	return nil
}

// PhaseRatio is β = (rt − df)² / (rt² − (rt − df)²), the exact annulus
// geometry with the tubing radius rt = d_tube/2 (MODEL.md §1).
func (c Column) PhaseRatio() float64 {
	rt := c.Diameter / 2
	ri := rt - c.Film
	return ri * ri / (rt*rt - ri*ri)
}

// ChannelDiameter is dg = d_tube − 2 df, the diameter of the open channel the
// gas flows through (MODEL.md §2).
func (c Column) ChannelDiameter() float64 { return c.Diameter - 2*c.Film }

func (c Column) ds() float64 {
	if c.StationaryDiffusivity == 0 {
		return DefaultDs
	}
	return c.StationaryDiffusivity
}

func (c Column) phi() float64 {
	if c.PlateHeightFactor == 0 {
		return 1
	}
	return c.PlateHeightFactor
}

// PressureMode says how the inlet is controlled.
type PressureMode int

// The inlet pressure modes.
const (
	ConstantFlow PressureMode = iota
	ConstantPressure
)

// PressureModes lists every pressure mode, in the order a choice cycles.
var PressureModes = []PressureMode{ConstantFlow, ConstantPressure}

// String is the mode as written in a method file.
func (m PressureMode) String() string {
	if m == ConstantPressure {
		return "constant-pressure"
	}
	return "constant-flow"
}

// ParsePressureMode reads a pressure mode as written in a method file.
func ParsePressureMode(s string) (PressureMode, error) {
	for _, m := range PressureModes {
		if s == m.String() {
			return m, nil
		}
	}
	return ConstantFlow, fmt.Errorf("%q is not one of constant-flow, constant-pressure", s)
}

// Carrier is the carrier gas and its control. Pressures are in Pa, flows in
// m³/s at the reference conditions Tn = 298.15 K, pn = 101.325 kPa.
type Carrier struct {
	Gas  Gas
	Mode PressureMode
	// Flow is Fn in m³/s at (Tn, pn); constant flow only.
	Flow float64
	// InletGauge is the inlet gauge pressure in Pa; constant pressure only.
	InletGauge float64
	// Vacuum is true for a vacuum (mass spectrometer) outlet, po = 0.
	Vacuum bool
	// Ambient is pamb in Pa; zero means 101.325 kPa.
	Ambient float64
	// InitialBand is σ0, the extra-column band in seconds.
	InitialBand float64
}

// AmbientPressure is pamb in Pa.
func (c Carrier) AmbientPressure() float64 {
	if c.Ambient == 0 {
		return StandardAtmosphere
	}
	return c.Ambient
}

// OutletPressure is po: ambient for an atmospheric detector, 0 for vacuum.
func (c Carrier) OutletPressure() float64 {
	if c.Vacuum {
		return 0
	}
	return c.AmbientPressure()
}

// Validate reports the first impossibility of the carrier settings.
func (c Carrier) Validate() error {
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	switch {
	case !c.Gas.valid():
		return fmt.Errorf("model: unknown carrier gas %d", int(c.Gas))
	case c.Mode == ConstantFlow && (!(c.Flow > 0) || bad(c.Flow)):
		return errors.New("model: carrier flow must be positive")
	case c.Mode == ConstantPressure && (!(c.InletGauge > 0) || bad(c.InletGauge)):
		return errors.New("model: inlet pressure must be positive")
	case c.Mode != ConstantFlow && c.Mode != ConstantPressure:
		return fmt.Errorf("model: unknown pressure mode %d", int(c.Mode))
	case c.Ambient < 0 || bad(c.Ambient):
		return errors.New("model: ambient pressure must be positive")
	case c.InitialBand < 0 || bad(c.InitialBand):
		return errors.New("model: initial band must not be negative")
	}
	return nil
}
