package model

import (
	"math"
	"testing"
)

// Each peak of the signal is a Gaussian of area amount·√(2π) (in s): the
// integral of the whole trace is the sum over the eluted peaks.
func TestSignalAreas(t *testing.T) {
	comps := []Compound{alkaneLike("c8", 8), alkaneLike("c10", 10), alkaneLike("c12", 12)}
	comps[1].Amount = 2.5
	sys := mustSystem(t, testColumn(), heliumFlow(1.2), comps)
	var res Result
	prog := Program{Initial: celsius(60), InitialHold: 60, Ramps: []Ramp{{Rate: perMin(15), Final: celsius(280), Hold: 300}}}
	if err := sys.Simulate(prog, &res); err != nil {
		t.Fatal(err)
	}
	want := 0.0
	end := 0.0
	for _, pk := range res.Peaks {
		if pk.Eluted {
			want += sys.Compounds[pk.Compound].AreaOrOne() * math.Sqrt(2*math.Pi)
			end = math.Max(end, pk.RetentionTime+10*pk.Sigma)
		}
	}
	const n = 400000
	dt := end / n
	got := 0.0
	for i := 0; i < n; i++ {
		got += res.Signal(sys.Compounds, (float64(i)+0.5)*dt) * dt
	}
	if math.Abs(got-want) > 1e-6*want {
		t.Errorf("area %.9g, want %.9g", got, want)
	}
}
