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

func TestNum(t *testing.T) {
	for x, want := range map[float64]string{1.2: "1.2", 325: "325", 0.25: "0.25", 1e-9: "1e-09", 0: "0", 101.325: "101.325", 2e9: "2e+09", -40: "-40"} {
		if got := Num(x); got != want {
			t.Errorf("Num(%v) = %q, want %q", x, got, want)
		}
	}
}

// A run with a target after the program is never "met", whatever the
// resolution of the eluted pairs.
func TestRsAllNotEluted(t *testing.T) {
	if got := RsAll(1.71, 1.5, []string{"nootkatone"}); got != "1.71 not met (target 1.50; nootkatone does not elute)" {
		t.Errorf("RsAll = %q", got)
	}
	if got := RsAll(1.71, 1.5, nil); got != Rs(1.71, 1.5) {
		t.Errorf("RsAll without late targets = %q", got)
	}
	if MetAll(1.71, 1.5, 1) || !MetAll(1.71, 1.5, 0) || VerdictAll(2, 1.5, 2) != "not met" {
		t.Error("MetAll/VerdictAll")
	}
	if got := NotEluted([]string{"a", "b", "c", "d", "e"}); got != "a, b, c and 2 more do not elute" {
		t.Errorf("NotEluted = %q", got)
	}
}

func TestOnStepAndClean(t *testing.T) {
	for _, c := range []struct {
		x, step float64
		want    string
	}{{82.25, 0.1, "82.3"}, {82.30000000000001, 0.1, "82.3"}, {6.942, 0.01, "6.94"}, {12, 0.25, "12.00"}, {37, 5, "35"},
		// half-way values round in decimal, away from zero, as written
		// (in binary 308.95 and 12.35 lie just below the half-way point
		// and 1.005 too; a float rounding gives 308.9, 12.3 and 1.00)
		{308.95, 0.1, "309.0"}, {12.35, 0.1, "12.4"}, {-12.35, 0.1, "-12.4"}, {1.005, 0.01, "1.01"},
		{12.345, 0.1, "12.3"}, {50.04, 0.1, "50.0"}, {240.06, 0.1, "240.1"}, {0.375, 0.25, "0.50"},
		{-0.04, 0.1, "0.0"}, {1e-7, 0.1, "0.0"}, {0.035, 0.01, "0.04"}} {
		if got := OnStep(c.x, c.step); got != c.want {
			t.Errorf("OnStep(%v, %v) = %q, want %q", c.x, c.step, got, c.want)
		}
	}
	if got := Clean(36.66666666666667); got != "36.6666666667" {
		t.Errorf("Clean = %q", got)
	}
	if got := Clean(308.90000000000003); got != "308.9" {
		t.Errorf("Clean = %q", got)
	}
}
