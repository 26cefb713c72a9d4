package methodsearch

import (
	"context"
	"reflect"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

func TestCompareRanksAndMatchesOptimize(t *testing.T) {
	base, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	short := base.Clone()
	short.Column.LengthM = 10
	long := base.Clone()
	long.Column.LengthM = 60
	cands := []Candidate{{"10", short}, {"30", base}, {"60", long}}
	s := optimizer.Settings{Starts: 8}
	out := Compare(context.Background(), cands, s, nil)
	again := Compare(context.Background(), cands, s, nil)
	for i := range out {
		if out[i].Source != again[i].Source || !reflect.DeepEqual(out[i].Result.Program, again[i].Result.Program) {
			t.Errorf("rerun differs at %d", i)
		}
	}
	// each row equals optimize on that candidate alone
	for _, o := range out {
		sys, _ := o.Method.System()
		r, err := optimizer.Optimize(context.Background(), Problem(o.Method, sys), s)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(r.Program, o.Result.Program) {
			t.Errorf("%s: compare row differs from optimize alone", o.Source)
		}
	}
	// the 10 m column cannot resolve the pair that the 30 m barely does:
	// a longer column never ranks below a column that fails the target
	pos := map[string]int{}
	for i, o := range out {
		pos[o.Source] = i
		t.Logf("%s m: feasible %v, %.2f min, Rs %.3f", o.Source, o.Result.Feasible(), o.Time/60, o.Result.Sim.MinResolution)
	}
	if out[pos["10"]].Result.Feasible() {
		t.Log("the 10 m column met the target")
	} else if pos["30"] > pos["10"] || pos["60"] > pos["10"] {
		t.Error("a failing short column ranks above longer columns")
	}
}
