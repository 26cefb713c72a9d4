package plan

import (
	"math"

	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/methodfile"
)

// judgement is a measured run held against the target.
type judgement struct {
	met   bool
	minRs float64
	pair  [2]string
}

// judge is the `check` command's judgement of run r (calibrate.Verify)
// under the current parameters: every target found and every counted pair
// of the prediction at the target as measured, Rs = 1.18 Δt / (w½,1 + w½,2)
// with a missing width taken from the prediction.
func (st *state) judge(r *methodfile.Run) judgement {
	j := judgement{minRs: math.Inf(1)}
	ck, err := calibrate.Verify(st.m, r)
	if err != nil || math.IsNaN(ck.MinResolution) {
		return j
	}
	j.met, j.minRs, j.pair = ck.Met, ck.MinResolution, ck.Critical
	return j
}
