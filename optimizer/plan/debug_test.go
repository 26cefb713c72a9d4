package plan

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"strconv"
	"testing"
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
		if p.Fit != nil {
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
		t.Logf("  measured min Rs %.3f all %v; true %.3f", rs, all, rampRsOf(t, truth, p.Oven))
	}
}
