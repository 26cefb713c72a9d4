package checks

import (
	"fmt"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// The first-target caution says which k it gives: k at the elution
// temperature, labelled k(Te) as the simulate table labels it, so that it
// is not compared with (tR − tM)/tM of the programmed run.
func TestFirstTargetKCautionNamesItsK(t *testing.T) {
	m, err := methodfile.ReadFile("../../testdata/bench20.toml")
	if err != nil {
		t.Fatal(err)
	}
	sys, res, err := simulateForTest(m)
	if err != nil {
		t.Fatal(err)
	}
	name, k, ok := FirstTargetK(sys, res)
	if !ok || k >= m.Goal.MinFirstK {
		t.Fatalf("bench20's first target %s has k %v (want below %v)", name, k, m.Goal.MinFirstK)
	}
	want := fmt.Sprintf("%s, elutes with k(Te) = %.2f, below %g (k(Te) is k at its elution temperature", name, k, m.Goal.MinFirstK)
	for _, w := range Warnings(m, sys, res) {
		if strings.HasPrefix(w, "goal.min_first_k") {
			if !strings.Contains(w, want) {
				t.Errorf("caution %q\nwant it to hold %q", w, want)
			}
			return
		}
	}
	t.Fatal("no goal.min_first_k caution")
}

func simulateForTest(m *methodfile.Method) (*model.System, *model.Result, error) {
	sys, err := m.System()
	if err != nil {
		return nil, nil, err
	}
	var res model.Result
	if err := sys.Simulate(m.ModelProgram(), &res); err != nil {
		return nil, nil, err
	}
	return sys, &res, nil
}
