package tui

import (
	"strings"
	"testing"
)

// The method line says goal.ramps is the optimizer's limit, not the
// program's count: the demo's program has 1 ramp, goal.ramps is 2.
func TestMethodLineSaysOptimizerRamps(t *testing.T) {
	for _, w := range []int{80, 120} {
		a, _ := newApp(t, w, 24)
		got := strings.Join(a.methodLines(1000), " ")
		if len(a.sh.method.Oven.Ramps) == a.sh.method.Goal.Ramps {
			t.Fatalf("the test needs a program whose ramp count differs from goal.ramps")
		}
		if !strings.Contains(got, "optimizer: run-time, up to 2 ramps") || strings.Contains(got, "goal run-time, 2 ramps") {
			t.Errorf("method line %q", got)
		}
		a.sh.method.Goal.Ramps = 1
		if got := strings.Join(a.methodLines(1000), " "); !strings.Contains(got, "up to 1 ramp ·") {
			t.Errorf("one ramp: %q", got)
		}
	}
}
