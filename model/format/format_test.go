package format

import "testing"

func TestRs(t *testing.T) {
	cases := []struct {
		rs, target float64
		want       string
	}{
		{1.4951, 1.5, "1.495 not met (target 1.50)"},
		{1.4999, 1.5, "1.4999 not met (target 1.50)"},
		{1.5, 1.5, "1.500 met (target 1.50)"},
		{1.5049, 1.5, "1.505 met (target 1.50)"},
		{1.62, 1.5, "1.62 met (target 1.50)"},
		{1.06, 1.5, "1.06 not met (target 1.50)"},
		{2.0, 1.75, "2.00 met (target 1.75)"},
		{1.0, 1.505, "1.00 not met (target 1.505)"},
	}
	for _, c := range cases {
		if got := Rs(c.rs, c.target); got != c.want {
			t.Errorf("Rs(%v, %v) = %q, want %q", c.rs, c.target, got, c.want)
		}
	}
	if Met(1.4951, 1.5) || !Met(1.5, 1.5) {
		t.Error("Met compares the unrounded value")
	}
	if CriticalPair("a", "b") != "◆ a / b" {
		t.Error(CriticalPair("a", "b"))
	}
}
