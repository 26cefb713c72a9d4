package calibrate

import (
	"strings"
	"testing"
)

// A fitted plate-height factor outside 0.8–1.3 (common practice) is warned,
// with which way the peaks are off; one near 1 is not.
func TestPlateHeightWarning(t *testing.T) {
	for _, c := range []struct {
		phi  float64
		want string
	}{{1, ""}, {0.8, ""}, {1.3, ""}, {1.438, "20 % wider"}, {0.6, "narrower"}} {
		w := plateHeightWarning(c.phi)
		if (c.want == "") != (w == "") || !strings.Contains(w, c.want) {
			t.Errorf("factor %g: %q, want %q", c.phi, w, c.want)
		}
	}
}
