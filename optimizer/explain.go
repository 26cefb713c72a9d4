package optimizer

import (
	"fmt"
	"math"
	"strings"

	"github.com/rampwise/rampwise/model"
)

// explain says in the trade's words why the target is not met, from the
// worst limiting pair's selectivity over the allowed temperature range and
// the plates it would need.
func explain(p *Problem, res *model.Result, limiting []int, sys *model.System) string {
	if res.TargetsNotEluted > 0 {
		var names []string
		for _, pk := range res.Peaks {
			if !pk.Eluted && sys.Compounds[pk.Compound].Target {
				names = append(names, sys.Compounds[pk.Compound].Name)
			}
		}
		return fmt.Sprintf("%s do(es) not elute within the limits: at the column maximum %.0f °C and the longest hold %.1f min it stays on the column; a less retentive column (thinner film, shorter column, another phase) is needed",
			strings.Join(names, ", "), p.maxFinal()-model.ZeroCelsius, p.Limits.MaxHold/60)
	}
	if len(limiting) == 0 {
		return "the best program found breaks a limit (hold length or inlet pressure); relax the limits"
	}
	pr := res.Pairs[limiting[0]]
	a, b := &sys.Compounds[pr.First], &sys.Compounds[pr.Second]
	// selectivity α = K_b/K_a over the allowed oven range
	bestAlpha, bestT := 1.0, p.Limits.OvenMin
	for t := p.Limits.OvenMin; t <= p.maxFinal(); t += 1 {
		al := math.Exp(math.Abs(b.LnK(t) - a.LnK(t)))
		if al > bestAlpha {
			bestAlpha, bestT = al, t
		}
	}
	name := fmt.Sprintf("%s / %s", a.Name, b.Name)
	if bestAlpha-1 < 1e-6 {
		return fmt.Sprintf("%s have the same retention on this phase at every temperature (α = 1.000): no oven program separates them; another stationary phase is needed", name)
	}
	// plates needed at large k (Purnell): N = 16 Rs² (α/(α−1))²
	need := 16 * p.MinResolution * p.MinResolution * math.Pow(bestAlpha/(bestAlpha-1), 2)
	// at most L / H_min plates: Golay's 1.915 r for an open tube, the van
	// Deemter minimum for a packed bed (MODEL.md §5, §10)
	have := sys.Cond.Column.Length / sys.Cond.MinPlateHeight()
	if need > have {
		return fmt.Sprintf("%s: the selectivity on this phase is at most α = %.4f (at %.0f °C); Rs %.2f would need about %.0f plates even isothermally, and the column gives at most about %.0f: a longer column, a narrower bore or another phase would be needed",
			name, bestAlpha, bestT-model.ZeroCelsius, p.MinResolution, need, have)
	}
	return fmt.Sprintf("%s reach only Rs %.2f within the limits; their selectivity is best (α = %.4f) near %.0f °C: a lower start temperature, slower ramps or longer holds than the limits allow, or a longer column, would be needed",
		name, pr.Resolution, bestAlpha, bestT-model.ZeroCelsius)
}
