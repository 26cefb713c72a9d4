package report

import (
	"math"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// The chromatogram and the oven panel put every tick of the time axis at
// the same x, at every figure size.
func TestFigurePanelsShareTimeAxis(t *testing.T) {
	for _, path := range []string{"../../testdata/demo.toml", "../../testdata/bench20.toml"} {
		s := simOf(t, path)
		for _, size := range [][2]int{{1200, 800}, {900, 600}, {400, 300}, {2000, 500}} {
			top, bottom, _, err := s.figurePlots()
			if err != nil {
				t.Fatal(err)
			}
			img := vgimg.NewWith(vgimg.UseWH(vg.Length(size[0]), vg.Length(size[1])), vgimg.UseDPI(96))
			up, low := panels(top, bottom, draw.New(img))
			du, dl := top.DataCanvas(up), bottom.DataCanvas(low)
			if top.X.Min != bottom.X.Min || top.X.Max != bottom.X.Max {
				t.Fatalf("%s: time ranges differ", path)
			}
			ticks := niceTicks{}.Ticks(top.X.Min, top.X.Max)
			if len(ticks) < 2 {
				t.Fatalf("%s: %d ticks", path, len(ticks))
			}
			for _, tk := range ticks {
				xu := du.X(top.X.Norm(tk.Value))
				xl := dl.X(bottom.X.Norm(tk.Value))
				if math.Abs(float64(xu-xl)) > 1e-6 {
					t.Errorf("%s %v: tick %g at x %.3f above and %.3f below", path, size, tk.Value, xu, xl)
				}
			}
		}
	}
}

// Peak labels keep at least a line apart (none overlaps another), in the
// order of their peaks, and inside the panel.
func TestPeakLabelsDoNotOverlap(t *testing.T) {
	for _, path := range []string{"../../testdata/demo.toml", "../../testdata/bench20.toml"} {
		s := simOf(t, path)
		for _, width := range []int{1200, 500} {
			top, bottom, pl, err := s.figurePlots()
			if err != nil {
				t.Fatal(err)
			}
			img := vgimg.NewWith(vgimg.UseWH(vg.Length(width), 400), vgimg.UseDPI(96))
			up, _ := panels(top, bottom, draw.New(img))
			dc := top.DataCanvas(up)
			apex, foot := pl.place(dc, top)
			gap := pl.style(false).FontExtents().Height * 1.1
			idx := make([]int, len(foot))
			for i := range idx {
				idx[i] = i
			}
			sort.Slice(idx, func(a, b int) bool { return apex[idx[a]].X < apex[idx[b]].X })
			moved := 0
			for k := 1; k < len(idx); k++ {
				a, b := foot[idx[k-1]], foot[idx[k]]
				if b.X-a.X < gap*0.999 {
					t.Errorf("%s at %d: labels %q and %q %.2f pt apart (a line is %.2f)", path, width, pl.labels[idx[k-1]].text, pl.labels[idx[k]].text, b.X-a.X, gap)
				}
			}
			for i := range foot {
				if foot[i].X < dc.Min.X || foot[i].X > dc.Max.X {
					t.Errorf("%s: label %q outside the panel", path, pl.labels[i].text)
				}
				if foot[i] != apex[i] {
					moved++
				}
			}
			t.Logf("%s at %d px: %d labels, %d moved aside with a leader line", path, width, len(foot), moved)
		}
	}
}

func TestNiceTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi  float64
		noPoint bool
	}{{0, 250, true}, {40, 125, true}, {0, 1.6, false}, {0, 18.8, true}} {
		var labels []string
		for _, tk := range (niceTicks{}).Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				labels = append(labels, tk.Label)
			}
		}
		joined := strings.Join(labels, " ")
		if c.noPoint && strings.Contains(joined, ".") {
			t.Errorf("[%g, %g]: %s", c.lo, c.hi, joined)
		}
		if strings.Contains(joined, ".00") || strings.HasSuffix(joined, "0.50") {
			t.Errorf("[%g, %g]: trailing zeros in %s", c.lo, c.hi, joined)
		}
	}
}

func TestSpreadKeepsOrderAndGap(t *testing.T) {
	want := []float64{10, 10.5, 11, 11.2, 50, 99, 99.5}
	got := spread(want, 3, 0, 100)
	for i := 1; i < len(got); i++ {
		if got[i]-got[i-1] < 3-1e-9 {
			t.Errorf("%v", got)
		}
	}
	if got[0] < 0 || got[len(got)-1] > 100 {
		t.Errorf("out of bounds: %v", got)
	}
	if got[4] != 50 {
		t.Errorf("an isolated label moved: %v", got)
	}
}
