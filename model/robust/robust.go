// Package robust evaluates how an oven program fares under the tolerances
// of [goal.robust] (MODEL.md, FORMAT.md): the oven hotter or colder by an
// offset throughout, the flow (or inlet gauge pressure) ± a percentage, the
// plate-height factor raised by a percentage — the 2³ = 8 corners of these
// — and, for each pair, Rs − z·σ_Rs with σ_Rs from first-order propagation
// of the retention parameters' standard errors with their covariance. The
// optimizer, the UI and the method sheet report the same figures from it.
package robust

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"github.com/rampwise/rampwise/model"
)

// Set is one carrier setting's nominal System and, built when first
// needed, the Systems the tolerances simulate on. Safe for concurrent use;
// each goroutine brings its own Scratch.
type Set struct {
	Tol  Tolerances
	Base *model.System

	// Stop, when set, ends a wait for the Systems being built (Evaluate then
	// returns ErrStopped; the build finishes in the background).
	Stop <-chan struct{}

	once sync.Once
	done chan struct{} // closed when the build has finished
	err  error
	// corner[0] and corner[1]: the flow (or pressure) × (1 ∓ pct/100), with
	// the tables raised by the oven offset so a hot corner stays in range.
	corner [2]*model.System
	// dH and dS: every compound's ΔH (ΔS) raised by perturbH (perturbS), for
	// the first-order propagation of the standard errors.
	dH, dS *model.System
}

// Built reports whether the Systems of the tolerances have been built (the
// first Evaluate that needs them builds them).
func (rg *Set) Built() bool {
	select {
	case <-rg.done:
		return true
	default:
		return false
	}
}

// ErrStopped is returned by Evaluate when Stop ended the wait for the
// Systems of the tolerances.
var ErrStopped = errors.New("robust: stopped before the tolerances were built")

// NewSet prepares the evaluation of programs on base under tol.
func NewSet(base *model.System, tol Tolerances) *Set {
	return &Set{Tol: tol, Base: base, done: make(chan struct{})}
}

// SE is the standard error of one compound's ΔH (J/mol) and ΔS
// (J/(mol·K)) and their correlation.
type SE struct{ DH, DS, Corr float64 }

// Tolerances are what the target must survive (zero turns each off): the
// oven hotter or colder by OvenOffset (K) throughout, the flow (or the
// inlet gauge pressure) × (1 ± FlowPct/100), the plate-height factor ×
// (1 + EfficiencyPct/100), and, for each pair, Rs − Z·σ_Rs.
type Tolerances struct {
	OvenOffset    float64
	FlowPct       float64
	EfficiencyPct float64
	Z             float64
	// Retention holds one entry per compound (zero entries and nil: Prior).
	Retention []SE
	// MeasureSD (s) and WidthScatter (relative), when set, add the scatter
	// of one measured run to σ_Rs: the SD of a resolution measured from
	// one run's retention times (each with SD MeasureSD) and half-height
	// widths (each with relative SD WidthScatter), Rs = Δt / (2 (σa + σb)),
	// so that Rs − Z·σ_Rs is the bound a verification run's measured
	// resolution should clear (the planner's criterion). First order:
	// σ² += (Rs·WidthScatter)² (σa² + σb²)/(σa + σb)² + 2 MeasureSD² / (2 (σa + σb))².
	MeasureSD, WidthScatter float64
	// Prior is used for compounds without standard errors (zero: ±2 kJ/mol
	// and ±4 J/(mol·K), uncorrelated; from memory, a typical estimate from
	// retention indices or an older column).
	PriorDH, PriorDS float64
}

// Instrument reports whether an instrument tolerance is set.
func (r Tolerances) Instrument() bool {
	return r.OvenOffset > 0 || r.FlowPct > 0 || r.EfficiencyPct > 0
}

// On reports whether any tolerance is set.
func (r Tolerances) On() bool { return r.Instrument() || r.Z > 0 }

// The finite-difference steps of the retention parameters: about 1e-4 in
// ln k, far above the tables' interpolation error and far below any
// curvature.
const (
	perturbH = 1.0   // J/mol
	perturbS = 0.001 // J/(mol·K)
)

// carrierWith is car with its setting (flow or pressure) scaled by f.
func carrierWith(car model.Carrier, f float64) model.Carrier {
	if car.Mode == model.ConstantPressure {
		car.InletGauge *= f
	} else {
		car.Flow *= f
	}
	return car
}

// build builds the Systems once, in a goroutine of its own, and waits for
// them or for Stop.
func (rg *Set) build() error {
	rg.once.Do(func() { go rg.construct() })
	select {
	case <-rg.done:
		return rg.err
	case <-rg.Stop:
		return ErrStopped
	}
}

func (rg *Set) construct() {
	defer close(rg.done)
	func() {
		rb := rg.Tol
		base := rg.Base
		col := base.Cond.Column
		if rb.Instrument() {
			col.MaxTemp += rb.OvenOffset + model.TableStep
			for i, s := range []float64{-1, 1} {
				cond, err := model.NewConditions(col, carrierWith(base.Cond.Carrier, 1+s*rb.FlowPct/100))
				if err == nil {
					rg.corner[i], err = model.NewSystem(cond, base.Compounds, base.Oven)
				}
				if err != nil {
					rg.err = err
					return
				}
				if rb.FlowPct == 0 {
					rg.corner[1] = rg.corner[0]
					break
				}
			}
		}
		if rb.Z > 0 {
			for _, which := range []int{0, 1} {
				comps := append([]model.Compound(nil), base.Compounds...)
				for i := range comps {
					if which == 0 {
						comps[i].DH += perturbH
					} else {
						comps[i].DS += perturbS
					}
				}
				sys, err := model.NewSystem(base.Cond, comps, base.Oven)
				if err != nil {
					rg.err = err
					return
				}
				if which == 0 {
					rg.dH = sys
				} else {
					rg.dS = sys
				}
			}
		}
	}()
}

// Report is how a program fares under the [goal.robust] tolerances.
type Report struct {
	On bool
	// Nominal is the minimum counted Rs at the nominal point.
	Nominal float64
	// Worst is the smallest minimum Rs over the corners of the instrument
	// tolerances, at Corner (e.g. "oven +1 °C, flow −2 %, efficiency −10 %");
	// NaN when no instrument tolerance is set.
	Worst  float64
	Corner string
	// Sigma is σ_Rs of the nominal critical pair from the retention
	// parameters' standard errors (first order, with their covariance).
	Sigma float64
	// LowZ is the smallest Rs − z·σ_Rs over the counted pairs, at pair
	// LowPair (index into the nominal Result's Pairs); NaN when z = 0.
	LowZ    float64
	LowPair int
	Z       float64
	// Margin is the smallest of Nominal, Worst and LowZ: the value the target
	// must not exceed.
	Margin float64
}

// MinCounted is the smallest counted Rs among the adjacent peaks (sorted)
// that elute by end, with each σ² taken as scale·(σ² − σ0²) + σ0² (the
// plate-height factor scaled by scale; σ0 is the extra-column band). It
// also returns the pair's position (−1: no counted pair, Rs = +Inf) and how
// many targets elute after end.
func MinCounted(peaks []model.Peak, comps []model.Compound, end, scale, s0 float64) (rs float64, at int, late int) {
	rs, at = math.Inf(1), -1
	s02 := s0 * s0
	sig := func(s float64) float64 {
		if scale == 1 {
			return s
		}
		return math.Sqrt(scale*(s*s-s02) + s02)
	}
	for i := range peaks {
		if peaks[i].RetentionTime > end && comps[peaks[i].Compound].Target {
			late++
		}
	}
	for i := 0; i+1 < len(peaks); i++ {
		a, b := &peaks[i], &peaks[i+1]
		if a.RetentionTime > end || b.RetentionTime > end {
			break
		}
		if !comps[a.Compound].Target && !comps[b.Compound].Target {
			continue
		}
		r := (b.RetentionTime - a.RetentionTime) / (2 * (sig(a.Sigma) + sig(b.Sigma)))
		if r < rs {
			rs, at = r, i
		}
	}
	return rs, at, late
}

// shifted is q with every temperature moved by d (K).
func shifted(q model.Program, d float64, dst *model.Program) {
	dst.Initial, dst.InitialHold = q.Initial+d, q.InitialHold
	dst.Ramps = append(dst.Ramps[:0], q.Ramps...)
	for i := range dst.Ramps {
		dst.Ramps[i].Final += d
	}
}

// Scratch is one goroutine's buffers for Evaluate.
type Scratch struct {
	res    model.Result
	resH   model.Result
	prog   model.Program
	byComp []int // position of each compound in a Result's peaks
	byH    []int
	// lastFail is the corner (0–3) that last fell below stopBelow
	lastFail int
}

func positions(res *model.Result, dst []int) []int {
	dst = dst[:0]
	for range res.Peaks {
		dst = append(dst, 0)
	}
	for i, pk := range res.Peaks {
		dst[pk.Compound] = i
	}
	return dst
}

// Evaluate evaluates program q (nom must be the simulation of q on the
// set's Base, with the run ending at the end of q) under the tolerances.
// With stopBelow finite it returns as soon as a check falls below it (the
// report is then partial, and the worst corner is not named); with
// stopBelow = −Inf the report is complete. rep.Margin is the figure to
// compare with the target.
func (rg *Set) Evaluate(q model.Program, nom *model.Result, sc *Scratch, stopBelow float64, rep *Report) error {
	rb := rg.Tol
	comps := rg.Base.Compounds
	end := q.RunTime()
	s0 := rg.Base.Cond.Carrier.InitialBand
	*rep = Report{On: rb.On(), Worst: math.NaN(), LowZ: math.NaN(), LowPair: -1, Z: rb.Z}
	n, _, _ := MinCounted(nom.Peaks, comps, end, 1, s0)
	rep.Nominal, rep.Margin = n, n
	if !rb.On() {
		return nil
	}
	eff := 1 + rb.EfficiencyPct/100
	if rb.Instrument() {
		// screen: the efficiency corner at the nominal oven and flow costs no
		// simulation and is the largest loss on most methods
		if e, _, _ := MinCounted(nom.Peaks, comps, end, eff, s0); e < stopBelow {
			rep.Margin = e
			return nil
		}
		if err := rg.build(); err != nil {
			return err
		}
		rep.Worst = math.Inf(1)
		var worst [3]float64
		// the corner is named only for a full report (no allocation while searching)
		defer func() {
			if math.IsInf(stopBelow, -1) && !math.IsInf(rep.Worst, 1) {
				rep.Corner = CornerName(rb, worst[0], worst[1], worst[2])
			}
		}()
		// the corners (oven +, flow −), (+, +), (−, −), (−, +); a partial
		// report starts with the corner that failed last with this scratch
		// (neighbouring programs mostly fail at the same corner)
		first := 0
		if !math.IsInf(stopBelow, -1) {
			first = sc.lastFail
		}
		for j := 0; j < 4; j++ {
			k := (first + j) % 4
			oven, fi := 1.0, k%2
			if k >= 2 {
				oven = -1
			}
			flow := float64(2*fi - 1) // −1, +1
			if (rb.OvenOffset == 0 && oven < 0) || (rb.FlowPct == 0 && fi > 0) {
				continue
			}
			shifted(q, oven*rb.OvenOffset, &sc.prog)
			if err := rg.corner[fi].Simulate(sc.prog, &sc.res); err != nil {
				return err
			}
			for _, e := range []float64{eff, 1} {
				rs, _, late := MinCounted(sc.res.Peaks, comps, end, e, s0)
				if late > 0 {
					rs = 0
				}
				if rs < rep.Worst {
					rep.Worst = rs
					worst = [3]float64{oven, flow, e}
				}
				if rb.EfficiencyPct == 0 {
					break
				}
			}
			if rep.Worst < rep.Margin {
				rep.Margin = rep.Worst
			}
			if rep.Worst < stopBelow {
				sc.lastFail = k
				return nil
			}
		}
	}
	if rb.Z > 0 {
		if err := rg.build(); err != nil {
			return err
		}
		low, at, sigma, err := rg.sigmaCheck(q, nom, sc, end, s0)
		if err != nil {
			return err
		}
		rep.LowZ, rep.LowPair, rep.Sigma = low, at, sigma
		if low < rep.Margin {
			rep.Margin = low
		}
	}
	return nil
}

// CornerName names a tolerance corner, e.g. "oven +1 °C, flow −2 %,
// plate height +10 %": oven and flow by their sign, eff the plate-height
// factor applied (above 1: raised). Every command and the planner name
// corners with it (one wording, one minus sign).
func CornerName(rb Tolerances, oven, flow, eff float64) string {
	sign := func(x float64) string {
		if x < 0 {
			return "−"
		}
		return "+"
	}
	var parts []string
	if rb.OvenOffset > 0 {
		parts = append(parts, fmt.Sprintf("oven %s%g °C", sign(oven), rb.OvenOffset))
	}
	if rb.FlowPct > 0 {
		parts = append(parts, fmt.Sprintf("flow %s%g %%", sign(flow), rb.FlowPct))
	}
	if rb.EfficiencyPct > 0 {
		if eff > 1 {
			parts = append(parts, fmt.Sprintf("plate height +%g %%", rb.EfficiencyPct))
		} else {
			parts = append(parts, "plate height nominal")
		}
	}
	s := ""
	for i, x := range parts {
		if i > 0 {
			s += ", "
		}
		s += x
	}
	return s
}

// se is compound i's standard errors (the prior when it has none).
func (r Tolerances) se(i int) SE {
	if r.Retention != nil && i < len(r.Retention) && (r.Retention[i].DH > 0 || r.Retention[i].DS > 0) {
		return r.Retention[i]
	}
	dh, ds := r.PriorDH, r.PriorDS
	if dh == 0 {
		dh = 2000
	}
	if ds == 0 {
		ds = 4
	}
	return SE{DH: dh, DS: ds}
}

// sigmaCheck is min over counted pairs of Rs − z·σ_Rs, that pair, and σ_Rs
// of the nominal critical pair. σ_Rs is first-order propagation: with
// g_i = (∂Rs/∂ΔH_i, ∂Rs/∂ΔS_i) by finite differences of each compound's
// retention time and width, and C_i the 2×2 covariance of its ΔH and ΔS
// (standard errors and correlation), σ_Rs² = Σ_i g_iᵀ C_i g_i over the two
// compounds of the pair (compounds' parameters are independent).
func (rg *Set) sigmaCheck(q model.Program, nom *model.Result, sc *Scratch, end, s0 float64) (low float64, at int, critSigma float64, err error) {
	if err := rg.dH.Simulate(q, &sc.resH); err != nil {
		return 0, -1, 0, err
	}
	if err := rg.dS.Simulate(q, &sc.res); err != nil {
		return 0, -1, 0, err
	}
	sc.byH = positions(&sc.resH, sc.byH)
	sc.byComp = positions(&sc.res, sc.byComp)
	comps := rg.Base.Compounds
	z := rg.Tol.Z
	low, at = math.Inf(1), -1
	_, crit, _ := MinCounted(nom.Peaks, comps, end, 1, s0)
	for i := 0; i+1 < len(nom.Peaks); i++ {
		a, b := &nom.Peaks[i], &nom.Peaks[i+1]
		if a.RetentionTime > end || b.RetentionTime > end {
			break
		}
		if !comps[a.Compound].Target && !comps[b.Compound].Target {
			continue
		}
		w := a.Sigma + b.Sigma
		rs := (b.RetentionTime - a.RetentionTime) / (2 * w)
		v := 0.0
		for k, pk := range []*model.Peak{a, b} {
			sgn := -1.0 // dRs/dtR of the first peak
			if k == 1 {
				sgn = 1
			}
			h := &sc.resH.Peaks[sc.byH[pk.Compound]]
			s := &sc.res.Peaks[sc.byComp[pk.Compound]]
			gH := (sgn*(h.RetentionTime-pk.RetentionTime)/(2*w) - rs*(h.Sigma-pk.Sigma)/w) / perturbH
			gS := (sgn*(s.RetentionTime-pk.RetentionTime)/(2*w) - rs*(s.Sigma-pk.Sigma)/w) / perturbS
			e := rg.Tol.se(pk.Compound)
			v += gH*gH*e.DH*e.DH + gS*gS*e.DS*e.DS + 2*e.Corr*gH*gS*e.DH*e.DS
		}
		if ms, ws := rg.Tol.MeasureSD, rg.Tol.WidthScatter; ms > 0 || ws > 0 {
			r := rs * ws / w
			v += r*r*(a.Sigma*a.Sigma+b.Sigma*b.Sigma) + 2*ms*ms/(4*w*w)
		}
		sd := math.Sqrt(math.Max(v, 0))
		if i == crit {
			critSigma = sd
		}
		if r := rs - z*sd; r < low {
			low, at = r, i
		}
	}
	return low, at, critSigma, nil
}
