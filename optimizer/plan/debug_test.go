package plan

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"strconv"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

func TestDebugLoop(t *testing.T) {
	s := os.Getenv("PLAN_DEBUG_SEED")
	if s == "" {
		t.Skip()
	}
	seed, _ := strconv.ParseUint(s, 10, 64)
	truth, rough := newSample(t, seed)
	t.Logf("compounds %d", len(truth.Compounds))
	l := &lab{truth: truth, rng: rand.New(rand.NewPCG(seed, 99))}
	for k := 1; k <= 5; k++ {
		runs, err := l.runsFile(rough)
		if err != nil {
			t.Fatal(err)
		}
		if k == 3 {
			debugEval = func(s string) { t.Log(s) }
		} else {
			debugEval = nil
		}
		p, err := Next(context.Background(), rough, runs, Settings{Optimizer: testOptimizer})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("step %d: %s %v\n  reason: %s\n  optimized %v sigmaT %.4f", k, p.Action, p.Oven, p.Reason, p.Optimized, p.RetentionSDMin)
		for i, c := range p.Method.Compounds {
			if c.Name == "c09" || c.Name == "c09-twin" {
				tc := truth.Compounds[i]
				t.Logf("  MAP %s: %.3f %.3f  true %.3f %.3f  rough %.3f %.3f", c.Name, c.DHkJ, c.DS, tc.DHkJ, tc.DS, rough.Compounds[i].DHkJ, rough.Compounds[i].DS)
			}
		}
		if p.Fit != nil {
			for _, c := range p.Fit.Compounds {
				if c.Name == "c09" || c.Name == "c09-twin" {
					t.Logf("  FIT %s: %.3f %.3f ± %.3f %.3f", c.Name, c.DHkJ, c.DS, c.StdErrDH, c.StdErrDS)
				}
			}
			for _, w := range p.Fit.Warnings {
				t.Logf("  warn %s", w)
			}
			for _, c := range p.Fit.Compounds {
				if c.Name == p.CriticalPair[0] || c.Name == p.CriticalPair[1] {
					t.Logf("  fit %s: %.3f %.3f runs %d rms %.4f", c.Name, c.DHkJ, c.DS, c.Runs, c.RMS)
				}
			}
			t.Logf("  phi %.3f warnings %d", p.Fit.PlateHeightFactor, len(p.Fit.Warnings))
		}
		for _, c := range truth.Compounds {
			if c.Name == p.CriticalPair[0] || c.Name == p.CriticalPair[1] {
				t.Logf("  true %s: %.3f %.3f phi %.3f", c.Name, c.DHkJ, c.DS, truth.Column.PlateHeight)
			}
		}
		if p.Action == Done {
			return
		}
		ms, _ := l.inject(fmt.Sprintf("run-%d", k), p.Oven)
		rs, all := ms.minRs()
		if k == 3 {
			for _, mm := range []*methodfile.Method{truth, p.Method} {
				x := mm.Clone()
				x.Oven = p.Oven
				sys, _ := x.System()
				var res model.Result
				sys.Simulate(x.ModelProgram(), &res)
				for _, pk := range res.Peaks {
					n := sys.Compounds[pk.Compound].Name
					if n == "c09" || n == "c09-twin" {
						t.Logf("    sim %s: t %.4f w %.5f", n, pk.RetentionTime/60, pk.HalfWidth()/60)
					}
				}
			}
			for n1, t1 := range ms.t {
				for n2, t2 := range ms.t {
					if t2 > t1 && t2-t1 < 0.05 {
						t.Logf("    pair %s %s: t %.4f %.4f w %.5f %.5f rs %.3f target %v %v", n1, n2, t1, t2, ms.w[n1], ms.w[n2], 1.1774*(t2-t1)/(ms.w[n1]+ms.w[n2]), ms.target[n1], ms.target[n2])
					}
				}
			}
		}
		t.Logf("  measured min Rs %.3f all %v; true %.3f", rs, all, rampRsOf(t, truth, p.Oven))
	}
}
