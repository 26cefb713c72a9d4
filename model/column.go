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

// ColumnKind is how the stationary phase sits in the column.
type ColumnKind int

// The column kinds (MODEL.md §1, §10, §11).
const (
	// WallCoated is a wall-coated open tube: a liquid film on the wall.
	WallCoated ColumnKind = iota
	// Packed is a tube filled with coated particles (MODEL.md §10).
	Packed
	// PorousLayer is an open tube whose wall carries a porous adsorbent
	// layer (MODEL.md §11).
	PorousLayer
)

var columnKindNames = [...]string{WallCoated: "wall-coated", Packed: "packed", PorousLayer: "porous-layer"}

// ColumnKinds lists every column kind, in the order a choice cycles.
var ColumnKinds = []ColumnKind{WallCoated, Packed, PorousLayer}

// String is the kind as written in a method file.
func (k ColumnKind) String() string {
	if k < 0 || int(k) >= len(columnKindNames) {
		return fmt.Sprintf("ColumnKind(%d)", int(k))
	}
	return columnKindNames[k]
}

// ParseColumnKind reads a kind as written in a method file.
func ParseColumnKind(s string) (ColumnKind, error) {
	for i, n := range columnKindNames {
		if s == n {
			return ColumnKind(i), nil
		}
	}
	return 0, fmt.Errorf("%q is not one of wall-coated, packed, porous-layer", s)
}

// Defaults of the packed-column model (MODEL.md §10) and of the porous layer
// (§11). All from memory or common practice, all settable.
const (
	DefaultPorosity          = 0.40   // ε, interparticle, randomly packed beds (common practice)
	DefaultEddyFactor        = 0.8    // λ (from memory)
	DefaultObstructionFactor = 0.7    // γ (from memory)
	DefaultMobileFactor      = 0.1    // ω (from memory)
	DefaultPackedFilm        = 1.0e-6 // effective liquid film on the particles, m (from memory)
	DefaultLayerDs           = 1.0e-7 // D_s of a porous layer, m²/s, order of pore-gas diffusion (from memory)
)

// Column is a chromatographic column of one of three kinds. Lengths are in
// metres, temperatures in kelvin. For a wall-coated column Film is the
// liquid film; for a porous-layer column it is the adsorbent layer; for a
// packed column Diameter is the tube's internal diameter, Film the
// effective liquid film on the particles (zero: DefaultPackedFilm) and the
// particle fields below apply.
type Column struct {
	Kind     ColumnKind
	Length   float64 // L, m
	Diameter float64 // d_tube (open tubes) or d_c (packed), internal diameter of the tubing, m
	Film     float64 // df, film or layer thickness, m
	MaxTemp  float64 // Tmax, K: no program may exceed it
	// StationaryDiffusivity is D_s in m²/s; zero means DefaultDs, or
	// DefaultLayerDs for a porous layer.
	StationaryDiffusivity float64
	// PlateHeightFactor is φ of MODEL.md §5; zero means 1.
	PlateHeightFactor float64

	// Packed columns only (MODEL.md §10).
	Particle float64 // dp, particle diameter, m (required)
	// Porosity is ε, the interparticle porosity; zero means DefaultPorosity.
	Porosity float64
	// GivenPhaseRatio is β of a packed column (required): it is not
	// geometry but the loading.
	GivenPhaseRatio float64
	// EddyFactor λ, ObstructionFactor γ, MobileFactor ω of the van Deemter
	// terms; zero means their defaults.
	EddyFactor, ObstructionFactor, MobileFactor float64
}

// Validate reports the first physical impossibility of the column.
func (c Column) Validate() error {
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	switch {
	case c.Kind < WallCoated || c.Kind > PorousLayer:
		return fmt.Errorf("model: unknown column kind %d", int(c.Kind))
	case !(c.Length > 0) || math.IsInf(c.Length, 0):
		return errors.New("model: column length must be positive")
	case !(c.Diameter > 0) || math.IsInf(c.Diameter, 0):
		return errors.New("model: column diameter must be positive")
	case c.Kind != Packed && (!(c.Film > 0) || math.IsInf(c.Film, 0)):
		return errors.New("model: film thickness must be positive")
	case c.Kind == Packed && (c.Film < 0 || bad(c.Film)):
		return errors.New("model: film thickness must be positive")
	case c.Kind != Packed && c.Film >= c.Diameter/2:
		return errors.New("model: film thicker than the column radius")
	case !(c.MaxTemp > 0) || math.IsInf(c.MaxTemp, 0):
		return errors.New("model: column maximum temperature must be above absolute zero")
	case c.StationaryDiffusivity < 0 || bad(c.StationaryDiffusivity):
		return errors.New("model: stationary-phase diffusivity must be positive")
	case c.PlateHeightFactor < 0 || bad(c.PlateHeightFactor):
		return errors.New("model: plate-height factor must be positive")
	}
	if c.Kind != Packed {
		if c.Particle != 0 || c.Porosity != 0 || c.GivenPhaseRatio != 0 || c.EddyFactor != 0 || c.ObstructionFactor != 0 || c.MobileFactor != 0 {
			return fmt.Errorf("model: particle size, porosity, phase ratio and the van Deemter factors belong to a packed column, not a %s one", c.Kind)
		}
		return nil
	}
	switch {
	case !(c.Particle > 0) || math.IsInf(c.Particle, 0):
		return errors.New("model: particle diameter must be positive")
	case c.Particle >= c.Diameter:
		return errors.New("model: particles as large as the tube")
	case c.Porosity < 0 || c.Porosity >= 1 || math.IsNaN(c.Porosity):
		return errors.New("model: porosity must be between 0 and 1")
	case !(c.GivenPhaseRatio > 0) || math.IsInf(c.GivenPhaseRatio, 0):
		return errors.New("model: a packed column needs its phase ratio")
	case c.EddyFactor < 0 || bad(c.EddyFactor), c.ObstructionFactor < 0 || bad(c.ObstructionFactor), c.MobileFactor < 0 || bad(c.MobileFactor):
		return errors.New("model: the van Deemter factors must not be negative")
	}
	return nil
}

// PhaseRatio is β. For an open tube (wall-coated or porous layer) it is the
// exact annulus geometry with the tubing radius rt = d_tube/2 (MODEL.md §1,
// §11): β = (rt − df)² / (rt² − (rt − df)²). For a packed column it is the
// given loading (§10).
func (c Column) PhaseRatio() float64 {
	if c.Kind == Packed {
		return c.GivenPhaseRatio
	}
	rt := c.Diameter / 2
	ri := rt - c.Film
	return ri * ri / (rt*rt - ri*ri)
}

// ChannelDiameter is dg = d_tube − 2 df, the diameter of the open channel the
// gas flows through (MODEL.md §2); for a packed column, the tube's diameter.
func (c Column) ChannelDiameter() float64 {
	if c.Kind == Packed {
		return c.Diameter
	}
	return c.Diameter - 2*c.Film
}

// Flow is the column as the carrier sees it (MODEL.md §10): the Darcy
// permeability B0 (m²), the flow porosity ε (the fraction of the
// cross-section the gas moves through) and the cross-section A (m²) of the
// tube. Every flow formula of the model is written once with these.
type Flow struct {
	Permeability float64 // B0, m²
	Porosity     float64 // ε
	Area         float64 // A, m²
}

// KozenyCarman is the permeability B0 = dp² ε³ / (180 (1 − ε)²) of a bed of
// spheres of diameter dp (m) and interparticle porosity ε, in m² (Carman
// 1937; MODEL.md §10).
func KozenyCarman(dp, porosity float64) float64 {
	e := porosity
	return dp * dp * e * e * e / (180 * (1 - e) * (1 - e))
}

// Flow is the column's flow description: an open tube is the case
// B0 = dg²/32, ε = 1, A = π dg²/4 (Hagen–Poiseuille, MODEL.md §2); a packed
// bed has the Kozeny–Carman permeability, its porosity and the tube's
// cross-section (§10).
func (c Column) Flow() Flow {
	if c.Kind == Packed {
		eps := c.porosity()
		return Flow{Permeability: KozenyCarman(c.Particle, eps), Porosity: eps, Area: math.Pi * c.Diameter * c.Diameter / 4}
	}
	dg := c.ChannelDiameter()
	return Flow{Permeability: dg * dg / 32, Porosity: 1, Area: math.Pi * dg * dg / 4}
}

func (c Column) porosity() float64 { return orDefault(c.Porosity, DefaultPorosity) }

func (c Column) film() float64 {
	if c.Kind == Packed {
		return orDefault(c.Film, DefaultPackedFilm)
	}
	return c.Film
}

func (c Column) ds() float64 {
	if c.Kind == PorousLayer {
		return orDefault(c.StationaryDiffusivity, DefaultLayerDs)
	}
	return orDefault(c.StationaryDiffusivity, DefaultDs)
}

func (c Column) phi() float64 { return orDefault(c.PlateHeightFactor, 1) }

// orDefault is x, or def when x is zero (the zero value means "default").
func orDefault(x, def float64) float64 {
	if x == 0 {
		return def
	}
	return x
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

// Outlet is what the column's outlet opens into: the ambient pressure of
// an atmospheric detector or the vacuum of a mass spectrometer.
type Outlet int

// The outlets.
const (
	// AtmosphericOutlet is an outlet at the ambient pressure (FID, TCD, ...).
	AtmosphericOutlet Outlet = iota
	// VacuumOutlet is an outlet into a vacuum (mass spectrometer), po = 0.
	VacuumOutlet
)

var outletNames = [...]string{AtmosphericOutlet: "atmospheric", VacuumOutlet: "vacuum"}

// Outlets lists every outlet, in the order a choice cycles.
var Outlets = []Outlet{AtmosphericOutlet, VacuumOutlet}

// String is the outlet as written in a method file.
func (o Outlet) String() string {
	if o < 0 || int(o) >= len(outletNames) {
		return fmt.Sprintf("Outlet(%d)", int(o))
	}
	return outletNames[o]
}

// Vacuum reports whether the outlet is a vacuum (Carrier.Vacuum).
func (o Outlet) Vacuum() bool { return o == VacuumOutlet }

// ParseOutlet reads an outlet as written in a method file (exactly, lower
// case).
func ParseOutlet(s string) (Outlet, error) {
	for i, n := range outletNames {
		if s == n {
			return Outlet(i), nil
		}
	}
	return AtmosphericOutlet, fmt.Errorf("%q is not one of atmospheric, vacuum", s)
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
