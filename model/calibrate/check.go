package calibrate

import (
	"fmt"
	"math"
	"sort"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// CheckCompound is one compound of a verification run: predicted and
// measured retention (min; Measured NaN when the run lacks it) and the
// half-height widths (min) used for the resolution.
type CheckCompound struct {
	Name               string
	Target             bool
	PredictedMin       float64
	MeasuredMin        float64
	DeltaMin           float64 // measured − predicted, NaN when not measured
	PredictedWidthMin  float64
	MeasuredWidthMin   float64 // 0 when the run gives none
	Assigned           bool    // the peak was unnamed and assigned here
	AssignedConfidence float64
}

// CheckPair is an adjacent pair of the prediction with its resolution
// predicted and as measured: Rs = 1.18 Δt / (w½,1 + w½,2) with the
// measured half-height widths, or the predicted ones where the run gives
// none (WidthsPredicted).
type CheckPair struct {
	First, Second   string
	Predicted       float64
	Measured        float64 // NaN when a peak is missing
	Counts          bool
	WidthsPredicted bool
	Reversed        bool // measured in the other order
}

// Check is a verification run compared with the method's prediction.
type Check struct {
	Run              *methodfile.Run // as matched: assigned names filled in
	Compounds        []CheckCompound // in predicted elution order
	Pairs            []CheckPair
	MinResolution    float64 // measured, over the counted pairs; NaN when none
	Critical         [2]string
	Target           float64 // goal.min_resolution
	MissingTargets   []string
	Met              bool
	Warnings, Notes  []string
	PredictedHoldupS float64
}

// Verify compares a measured run of a method's program with what the
// method predicts for that program: per compound the retention-time
// difference, the resolution of each predicted adjacent pair as measured,
// and whether the target resolution holds in the measured run (every
// target found, every counted pair at or above goal.min_resolution).
// Unnamed peaks are assigned as fit assigns them (one run: no refit).
func Verify(m *methodfile.Method, run *methodfile.Run) (*Check, error) {
	runs := (&methodfile.Runs{File: "", Runs: []methodfile.Run{*run}}).CloneRuns()
	ck := &Check{Target: m.Goal.MinResolution, MinResolution: math.NaN()}
	rep := &Report{}
	ck.Warnings = append(ck.Warnings, checkNames(m, runs, Options{}, "the comparison")...)
	st, err := setups(m, runs)
	if err != nil {
		return nil, err
	}
	work := m.Clone()
	if hasUnnamed(runs) {
		if err := assignLoop(work, m, st, runs, Options{}, rep); err != nil {
			return nil, err
		}
	}
	ck.Warnings = append(ck.Warnings, rep.Warnings...)
	ck.Notes = append(ck.Notes, rep.Notes...)
	r := &runs.Runs[0]
	ck.Run = r
	conf := map[string]float64{}
	for _, a := range rep.Assignments {
		conf[a.Compound] = a.Confidence
	}
	rm := m.RunMethod(r)
	sys, err := rm.System()
	if err != nil {
		return nil, err
	}
	var res model.Result
	if err := sys.Simulate(rm.ModelProgram(), &res); err != nil {
		return nil, err
	}
	ck.PredictedHoldupS = res.HoldupTime
	byIdx := map[int]int{}
	for _, pk := range res.Peaks {
		c := sys.Compounds[pk.Compound]
		cc := CheckCompound{Name: c.Name, Target: c.Target, PredictedMin: pk.RetentionTime / 60, PredictedWidthMin: pk.HalfWidth() / 60,
			MeasuredMin: math.NaN(), DeltaMin: math.NaN()}
		if t, ok := r.Retention[c.Name]; ok {
			cc.MeasuredMin, cc.DeltaMin = t, t-cc.PredictedMin
			cc.MeasuredWidthMin = r.Widths[c.Name]
			if x, ok := conf[c.Name]; ok {
				cc.Assigned, cc.AssignedConfidence = true, x
			}
		} else if c.Target && pk.Eluted {
			ck.MissingTargets = append(ck.MissingTargets, c.Name)
		}
		byIdx[pk.Compound] = len(ck.Compounds)
		ck.Compounds = append(ck.Compounds, cc)
	}
	for _, p := range res.Pairs {
		a, b := ck.Compounds[byIdx[p.First]], ck.Compounds[byIdx[p.Second]]
		cp := CheckPair{First: a.Name, Second: b.Name, Predicted: p.Resolution, Counts: p.Counts, Measured: math.NaN()}
		if !math.IsNaN(a.MeasuredMin) && !math.IsNaN(b.MeasuredMin) {
			wa, wb := a.MeasuredWidthMin, b.MeasuredWidthMin
			if wa <= 0 {
				wa, cp.WidthsPredicted = a.PredictedWidthMin, true
			}
			if wb <= 0 {
				wb, cp.WidthsPredicted = b.PredictedWidthMin, true
			}
			cp.Measured = 1.1774100225154747 * math.Abs(b.MeasuredMin-a.MeasuredMin) / (wa + wb)
			cp.Reversed = b.MeasuredMin < a.MeasuredMin
			if p.Counts && (math.IsNaN(ck.MinResolution) || cp.Measured < ck.MinResolution) {
				ck.MinResolution = cp.Measured
				ck.Critical = [2]string{a.Name, b.Name}
			}
		}
		ck.Pairs = append(ck.Pairs, cp)
	}
	sort.Strings(ck.MissingTargets)
	ck.Met = len(ck.MissingTargets) == 0 && !math.IsNaN(ck.MinResolution) && ck.MinResolution >= ck.Target
	if math.IsNaN(ck.MinResolution) && len(ck.MissingTargets) == 0 {
		ck.Met = true // no counted pair: nothing to separate
		for _, p := range ck.Pairs {
			if p.Counts {
				ck.Met = false
			}
		}
	}
	for _, p := range ck.Pairs {
		if p.Reversed {
			ck.Notes = append(ck.Notes, fmt.Sprintf("%s and %s elute in the other order than predicted", p.First, p.Second))
		}
	}
	return ck, nil
}
