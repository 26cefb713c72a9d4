package plan

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// lab plays the instrument for the tests: a column with hidden compound
// parameters and a hidden plate-height factor, measured with noise of
// retentionSD in retention time and widthScatter (relative) in half-height
// width (the figures of the planning issue). A peak is reported only when
// it elutes before the program ends.
type lab struct {
	truth *methodfile.Method
	rng   *rand.Rand
	runs  strings.Builder // the runs file so far
	n     int
}

const (
	labRetentionSD  = 0.002 // min
	labWidthScatter = 0.03
)

// measured is one simulated injection.
type measured struct {
	t, w   map[string]float64
	target map[string]bool
}

// inject runs the program on the hidden column and appends the run to the
// runs file, filling in the [[run]] block the planner prints.
func (l *lab) inject(name string, o methodfile.Oven) (measured, error) {
	m := l.truth.Clone()
	m.Oven = o
	sys, err := m.System()
	if err != nil {
		return measured{}, err
	}
	var res model.Result
	if err := sys.Simulate(m.ModelProgram(), &res); err != nil {
		return measured{}, err
	}
	out := measured{t: map[string]float64{}, w: map[string]float64{}, target: map[string]bool{}}
	for _, c := range m.Compounds {
		out.target[c.Name] = c.Target
	}
	end := m.ModelProgram().RunTime()
	for _, pk := range res.Peaks {
		if pk.RetentionTime > end {
			continue
		}
		nm := sys.Compounds[pk.Compound].Name
		out.t[nm] = math.Round((pk.RetentionTime/60+l.rng.NormFloat64()*labRetentionSD)*1e4) / 1e4
		out.w[nm] = math.Round(pk.HalfWidth()/60*(1+l.rng.NormFloat64()*labWidthScatter)*1e5) / 1e5
	}
	block := RunBlock(name, o, &l.truth.Carrier, l.truth.Limits, nil)
	head := block[:strings.Index(block, "[run.retention_min]")]
	l.runs.WriteString(head)
	l.runs.WriteString("[run.retention_min]\n")
	names := make([]string, 0, len(out.t))
	for nm := range out.t {
		names = append(names, nm)
	}
	sort.Strings(names)
	for _, nm := range names {
		fmt.Fprintf(&l.runs, "%q = %g\n", nm, out.t[nm])
	}
	l.runs.WriteString("[run.width_min]\n")
	for _, nm := range names {
		fmt.Fprintf(&l.runs, "%q = %g\n", nm, out.w[nm])
	}
	l.runs.WriteString("\n")
	l.n++
	return out, nil
}

// measuredMinRs is the run's measured minimum resolution over adjacent
// pairs with a target, Rs = 1.18 Δt / (w½,1 + w½,2), and whether every
// target was seen (an independent reading of the measured run).
func (ms measured) minRs() (float64, bool) {
	type pk struct {
		n    string
		t, w float64
	}
	var p []pk
	for n, t := range ms.t {
		p = append(p, pk{n, t, ms.w[n]})
	}
	for n, tg := range ms.target {
		if _, ok := ms.t[n]; tg && !ok {
			return 0, false
		}
	}
	sort.Slice(p, func(a, b int) bool { return p[a].t < p[b].t })
	least := math.Inf(1)
	for i := 0; i+1 < len(p); i++ {
		if !ms.target[p[i].n] && !ms.target[p[i+1].n] {
			continue
		}
		least = math.Min(least, 1.1774*(p[i+1].t-p[i].t)/(p[i].w+p[i+1].w))
	}
	return least, true
}

func (l *lab) runsFile(m *methodfile.Method) (*methodfile.Runs, error) {
	if l.n == 0 {
		return nil, nil
	}
	return methodfile.ParseRuns("lab-runs.toml", []byte(l.runs.String()), m)
}

// sampleMethod is the method file text shared by the hidden truth and the
// rough start.
const sampleHead = `title = "simulated lab sample"
[column]
length_m = 30.0
diameter_mm = 0.25
film_um = 0.25
max_temp_c = 325.0
plate_height_factor = %g
[carrier]
gas = "helium"
mode = "constant-flow"
flow_ml_min = 1.2
[oven]
initial_c = 40.0
initial_hold_min = 1.0
[[oven.ramp]]
rate_c_min = 10.0
final_c = 300.0
hold_min = 5.0
[limits]
oven_min_c = 35.0
max_rate_c_min = 60.0
max_hold_min = 10.0
[goal]
min_resolution = 1.5
ramps = 2
tail_min = 0.5
# the generated light compounds may elute close to the void even at the
# lowest start: the first-target rule of the optimizer is off here
min_first_k = 0.0
[goal.robust]
oven_offset_c = 1.0
flow_pct = 2.0
efficiency_pct = 10.0
retention_sigma = 2.0
[injection]
detector_temp_c = 320.0
`

type sampleCompound struct {
	name   string
	dH, dS float64 // kJ/mol, J/(mol·K)
}

func sampleText(phi float64, cs []sampleCompound) string {
	var b strings.Builder
	fmt.Fprintf(&b, sampleHead, phi)
	for _, c := range cs {
		fmt.Fprintf(&b, "[[compound]]\nname = %q\ndH_kJ_mol = %.4f\ndS_J_mol_K = %.4f\n", c.name, c.dH, c.dS)
	}
	return b.String()
}

// newSample draws a random sample (10–40 compounds on a homologous-like
// series, 1–3 close pairs whose selectivity changes with temperature, a
// hidden plate-height factor 0.9–1.3) that a slow ramp separates and a
// fast one does not, and its rough starting parameters (ΔH off by 1–2
// kJ/mol either way, ΔS by up to 2 J/(mol·K)). Invented data.
func newSample(t testing.TB, seed uint64) (truth, rough *methodfile.Method) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 77))
	for attempt := 0; attempt < 200; attempt++ {
		n := 10 + rng.IntN(31)
		pairs := 1 + rng.IntN(3)
		single := n - pairs
		var cs []sampleCompound
		carbon := 5.0
		for i := 0; i < single; i++ {
			carbon += 0.25 + 0.45*rng.Float64()
			eh := rng.NormFloat64() * 1.0
			cs = append(cs, sampleCompound{
				name: fmt.Sprintf("c%02d", i+1),
				dH:   -(9 + 4.9*carbon) + eh,
				dS:   -(44 + 6.0*carbon) + eh*1000/420,
			})
		}
		used := map[int]bool{}
		for p := 0; p < pairs; p++ {
			i := rng.IntN(single)
			if used[i] || used[i-1] || used[i+1] {
				continue
			}
			used[i] = true
			base := cs[i]
			d := 0.03 + 0.05*rng.Float64()
			e := (rng.Float64()*2 - 1) * 0.8
			tx := 340 + 160*rng.Float64()
			cs = append(cs, sampleCompound{
				name: fmt.Sprintf("%s-twin", base.name),
				dH:   base.dH - 4.9*d + e,
				dS:   base.dS - 6.0*d + e*1000/tx,
			})
		}
		phi := 0.9 + 0.4*rng.Float64()
		tm, err := methodfile.Parse("truth.toml", []byte(sampleText(phi, cs)))
		if err != nil {
			t.Fatal(err)
		}
		// a slow ramp must separate everything, a fast one must not
		if rs := rampRs(t, tm, 3); rs < 2.0 {
			continue
		}
		if rs := rampRs(t, tm, 30); rs >= 1.5 {
			continue
		}
		rc := make([]sampleCompound, len(cs))
		for i, c := range cs {
			sign := 1.0
			if rng.IntN(2) == 0 {
				sign = -1
			}
			rc[i] = sampleCompound{name: c.name, dH: c.dH + sign*(1+rng.Float64()), dS: c.dS + (rng.Float64()*2-1)*2}
		}
		rm, err := methodfile.Parse("rough.toml", []byte(sampleText(1.0, rc)))
		if err != nil {
			t.Fatal(err)
		}
		return tm, rm
	}
	t.Fatalf("seed %d: no sample found", seed)
	return nil, nil
}

// rampRs is the minimum resolution of a linear ramp from 35 °C at rate
// °C/min to 300 °C.
func rampRs(t testing.TB, m *methodfile.Method, rate float64) float64 {
	t.Helper()
	res := simulateOven(t, m, methodfile.Oven{InitialC: 35, InitialHoldMin: 1, Ramps: []methodfile.Ramp{{RateCMin: rate, FinalC: 300, HoldMin: 10}}})
	return res.MinResolution
}
