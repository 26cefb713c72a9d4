package methodfile

import (
	"bytes"
	"fmt"

	toml "github.com/pelletier/go-toml/v2"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/fsafe"
)

func ptr[T any](x T) *T { return &x }

// Marshal renders the method as TOML. Defaults are written out, so a saved
// method says everything it means; compounds derived from a retention index
// keep only the index (their parameters are derived again on load).
func Marshal(m *Method) ([]byte, error) {
	r := rawMethod{
		Column: &rawColumn{
			LengthM:     ptr(m.Column.LengthM),
			DiameterMM:  ptr(m.Column.DiameterMM),
			FilmUM:      ptr(m.Column.FilmUM),
			MaxTempC:    ptr(m.Column.MaxTempC),
			Diffusivity: ptr(m.Column.Diffusivity),
			PlateHeight: ptr(m.Column.PlateHeight),
		},
		Carrier: &rawCarrier{
			Gas:         ptr(m.Carrier.Gas.String()),
			Mode:        ptr(m.Carrier.Mode.String()),
			Outlet:      ptr(m.Carrier.Outlet.String()),
			AmbientKPa:  ptr(m.Carrier.AmbientKPa),
			InitialBand: ptr(m.Carrier.InitialBand),
		},
		Oven: &rawOven{InitialC: ptr(m.Oven.InitialC), InitialHoldMin: ptr(m.Oven.InitialHoldMin)},
		Limits: &rawLimits{
			OvenMinC:         ptr(m.Limits.OvenMinC),
			MaxRateCMin:      ptr(m.Limits.MaxRateCMin),
			MaxHoldMin:       ptr(m.Limits.MaxHoldMin),
			AmbientC:         ptr(m.Limits.AmbientC),
			CooldownTauMin:   ptr(m.Limits.CooldownTauMin),
			EquilibrationMin: ptr(m.Limits.EquilibrationMin),
			MaxInletKPa:      ptr(m.Limits.MaxInletKPa),
		},
		Goal: &rawGoal{
			MinResolution: ptr(m.Goal.MinResolution),
			Objective:     ptr(m.Goal.Objective.String()),
			Ramps:         ptr(int64(m.Goal.Ramps)),
			TailMin:       ptr(m.Goal.TailMin),
			Lock:          lockNames(m.Goal.Lock),
		},
	}
	if m.Title != "" {
		r.Title = ptr(m.Title)
	}
	if m.Notes != "" {
		r.Notes = ptr(m.Notes)
	}
	if m.Column.Phase != "" {
		r.Column.Phase = ptr(m.Column.Phase)
	}
	if m.Column.HasCapacity {
		r.Column.CapacityNG = ptr(m.Column.CapacityNG)
	}
	if m.Column.Kind != model.WallCoated {
		r.Column.Kind = ptr(m.Column.Kind.String())
	}
	if m.Column.HasMaxIsothermal {
		r.Column.MaxIsoC = ptr(m.Column.MaxIsothermalC)
	}
	if m.Column.HasParticle {
		r.Column.ParticleUM = ptr(m.Column.ParticleUM)
	}
	if m.Column.HasPorosity || m.Column.Kind == model.Packed {
		r.Column.Porosity = ptr(m.Column.Porosity)
	}
	if m.Column.HasPhaseRatio {
		r.Column.PhaseRatio = ptr(m.Column.PhaseRatio)
	}
	if m.Column.Kind == model.Packed {
		r.Column.EddyLambda = ptr(m.Column.EddyLambda)
		r.Column.ObstrGamma = ptr(m.Column.ObstructionGamma)
		r.Column.MobileOmega = ptr(m.Column.MobileOmega)
	}
	marshalLimits(m, r.Limits)
	marshalGoal(m, r.Goal)
	if m.Carrier.FlowMLMin > 0 {
		r.Carrier.FlowMLMin = ptr(m.Carrier.FlowMLMin)
	}
	if m.Carrier.InletKPa > 0 {
		r.Carrier.InletKPa = ptr(m.Carrier.InletKPa)
	}
	for _, rp := range m.Oven.Ramps {
		r.Oven.Ramp = append(r.Oven.Ramp, rawRamp{RateCMin: ptr(rp.RateCMin), FinalC: ptr(rp.FinalC), HoldMin: ptr(rp.HoldMin)})
	}
	if m.Injection.Present {
		in := &rawInjection{VolumeUL: ptr(m.Injection.VolumeUL), SplitRatio: ptr(m.Injection.SplitRatio)}
		if m.Injection.HasInletTemp {
			in.InletTempC = ptr(m.Injection.InletTempC)
		}
		if m.Injection.HasDetector {
			in.DetectorTempC = ptr(m.Injection.DetectorTempC)
		}
		r.Injection = in
	}
	for _, c := range m.Compounds {
		rc := rawCompound{Name: ptr(c.Name), Target: ptr(c.Target)}
		if c.Formula != "" {
			rc.Formula = ptr(c.Formula)
		}
		if c.AromaticRings != 0 {
			rc.AromaticRings = ptr(int64(c.AromaticRings))
		}
		if !c.FromIndex && !c.FromFormula {
			rc.DHkJ = ptr(c.DHkJ)
			rc.DS = ptr(c.DS)
			if c.DCp != 0 {
				rc.DCp = ptr(c.DCp)
			}
			if c.RefTempC != 100 {
				rc.RefTempC = ptr(c.RefTempC)
			}
		}
		if c.Amount != 1 {
			rc.Amount = ptr(c.Amount)
		}
		if c.HasConc {
			rc.Concentration = ptr(c.Concentration)
		}
		if c.AlkaneCarbons != 0 {
			rc.AlkaneCarbons = ptr(int64(c.AlkaneCarbons))
		}
		if c.RetentionIndex != 0 {
			rc.RetentionIndex = ptr(c.RetentionIndex)
		}
		if c.HasIndexTemp {
			rc.IndexTempC = ptr(c.IndexTempC)
		}
		if c.HasSE {
			rc.DHSE = ptr(c.DHSE)
			rc.DSSE = ptr(c.DSSE)
			rc.DHDSCorr = ptr(c.DHDSCorr)
		}
		r.Compound = append(r.Compound, rc)
	}
	var buf bytes.Buffer
	buf.WriteString("# rampwise method file\n")
	enc := toml.NewEncoder(&buf)
	enc.SetIndentTables(false)
	if err := enc.Encode(r); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// marshalLimits writes the second-wave [limits] keys that are set or differ
// from their defaults.
func marshalLimits(m *Method, r *rawLimits) {
	l := m.Limits
	if l.HasCoolant {
		r.CoolantC = ptr(l.CoolantC)
	}
	if l.MinInletKPa != 0 {
		r.MinInletKPa = ptr(l.MinInletKPa)
	}
	if l.MinFlowMLMin > 0 {
		r.MinFlowMLMin = ptr(l.MinFlowMLMin)
	}
	if l.MaxFlowMLMin > 0 {
		r.MaxFlowMLMin = ptr(l.MaxFlowMLMin)
	}
	opt := func(x, def float64) *float64 {
		if x == def || x == 0 {
			return nil
		}
		return ptr(x)
	}
	r.TempStepC = opt(l.TempStepC, DefaultTempStepC)
	r.RateStepCMin = opt(l.RateStepCMin, DefaultRateStepCMin)
	r.HoldStepMin = opt(l.HoldStepMin, DefaultHoldStepMin)
	r.FlowStepMLMin = opt(l.FlowStepMLMin, DefaultFlowStepMLMin)
	r.PressureStepKPa = opt(l.PressureStepKPa, DefaultPressureStepKPa)
	for _, b := range l.RateBands {
		r.RateBand = append(r.RateBand, rawRateBand{AboveC: ptr(b.AboveC), MaxRateCMin: ptr(b.MaxRateCMin)})
	}
}

// marshalGoal writes the second-wave [goal] keys and [goal.robust] when set.
func marshalGoal(m *Method, r *rawGoal) {
	g := m.Goal
	if g.MinFirstK != DefaultMinFirstK {
		r.MinFirstK = ptr(g.MinFirstK)
	}
	if g.HasBakeout {
		r.BakeoutC = ptr(g.BakeoutC)
		r.BakeoutMin = ptr(g.BakeoutMin)
	}
	rb := g.Robust
	opt := func(x, def float64) *float64 {
		if x == def {
			return nil
		}
		return ptr(x)
	}
	raw := rawRobust{
		OvenOffsetC:     opt(rb.OvenOffsetC, 0),
		FlowPct:         opt(rb.FlowPct, 0),
		EfficiencyPct:   opt(rb.EfficiencyPct, 0),
		RetentionSigma:  opt(rb.RetentionSigma, 0),
		PriorDHkJ:       opt(rb.PriorDHkJ, DefaultPriorDHkJ),
		PriorDS:         opt(rb.PriorDS, DefaultPriorDS),
		RetentionTimeSD: opt(rb.RetentionTimeSDMin, DefaultRetentionTimeSDMin),
	}
	if raw != (rawRobust{}) {
		r.Robust = &raw
	}
}

// WriteFile saves the method at path. When path already holds a valid
// method, the save changes only what differs, in place in its text
// (comments, layout and quoting kept; see Update); otherwise the method is
// written fresh. The write itself is fsafe.WriteFile: atomic, through
// symlinks, owner and mode kept.
func WriteFile(path string, m *Method) error {
	_, err := Save(path, nil, m)
	return err
}

// Save writes m at path over base: the text m was derived from (an input
// file for optimize --out, the loaded text for the UI). A nil base means the
// current content of path, if it is a regular file. It reports whether the
// base's text was kept (false: written fresh, comments not kept).
func Save(path string, base []byte, m *Method) (kept bool, err error) {
	_, kept, err = SaveText(path, base, m)
	return kept, err
}

// SaveText is Save that also returns the text written (nil when nothing
// was): the base of the next save of the same method (the UI's save as
// keeps the text it loaded or last wrote).
func SaveText(path string, base []byte, m *Method) (written []byte, kept bool, err error) {
	if base == nil {
		if cur, err := fsafe.ReadRegular(path, MaxFileSize); err == nil {
			base = cur
		}
	}
	data, kept, err := Update(path, base, m)
	if err != nil {
		return nil, false, fmt.Errorf("%s: %v", path, err)
	}
	// Check what we write reads back before it replaces anything (Update
	// has already checked a text it kept).
	if !kept {
		if _, err := Parse(path, data); err != nil {
			return nil, false, fmt.Errorf("refusing to save an invalid method: %v", err)
		}
	}
	if err := WriteAtomic(path, data); err != nil {
		return nil, kept, err
	}
	return data, kept, nil
}

// WriteAtomic writes data to path without ever leaving a half-written
// file: see fsafe.WriteFile (atomic replace of a regular file, write-through
// of a symlink's target, a device or a hard-linked file; owner, group and
// mode kept). A failure leaves any existing file at path untouched.
func WriteAtomic(path string, data []byte) error {
	return fsafe.WriteFile(path, data)
}

// FlowLockName is the goal.lock name that keeps the carrier flow (or, at
// constant pressure, the inlet pressure) as the method has it.
const FlowLockName = "flow"

func lockNames(vs []model.ProgramValue) []string {
	out := make([]string, len(vs))
	for i, v := range vs {
		out[i] = v.String()
		if v.Kind == model.CarrierFlow || v.Kind == model.InletPressure {
			out[i] = FlowLockName
		}
	}
	return out
}
