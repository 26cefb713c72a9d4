package model

import (
	"math/rand/v2"
	"strconv"
	"testing"
)

// What the oven shows is what it saves: a program on keypad steps (0.1 °C,
// 0.1 °C/min, 0.01 min, and coarser or finer steps), from −100 °C up,
// converted to SI units and back comes back bit for bit as typed; without
// the rounding, 0.1 °C would come back as 0.10000000000002274 (and with 12
// significant digits for temperatures too, 0.01 °C as 0.00999999999999).
// (The keypad's own steps are the caller's: see optimizer.Steps.)
func TestFileProgramRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	grid := func(n int, step float64, dec int) float64 {
		v, _ := strconv.ParseFloat(strconv.FormatFloat(float64(n)*step, 'f', dec, 64), 64)
		return v
	}
	raw := 0 // values the plain inverse conversion does not give back
	for i := 0; i < 20000; i++ {
		steps := []struct {
			s   float64
			dec int
		}{{0.1, 1}, {0.01, 2}, {1, 0}, {0.5, 1}, {0.25, 2}}
		st := steps[rng.IntN(len(steps))]
		o := FileProgram{InitialC: grid(rng.IntN(4000)-1000, st.s, st.dec), InitialHoldMin: grid(rng.IntN(10000), 0.01, 2)}
		prev := o.InitialC
		for r := rng.IntN(6); r > 0; r-- {
			f := prev + grid(1+rng.IntN(3000), st.s, st.dec)
			f, _ = strconv.ParseFloat(strconv.FormatFloat(f, 'f', st.dec, 64), 64)
			o.Ramps = append(o.Ramps, FileRamp{RateCMin: grid(1+rng.IntN(1200), 0.1, 1), FinalC: f, HoldMin: grid(rng.IntN(6000), 0.01, 2)})
			prev = f
		}
		p := o.Program()
		if p.Initial-ZeroCelsius != o.InitialC {
			raw++
		}
		back := FileProgramOf(p)
		if back.InitialC != o.InitialC || back.InitialHoldMin != o.InitialHoldMin || len(back.Ramps) != len(o.Ramps) {
			t.Fatalf("%+v came back as %+v", o, back)
		}
		for j := range o.Ramps {
			if back.Ramps[j] != o.Ramps[j] {
				t.Fatalf("%+v came back as %+v", o, back)
			}
		}
		var q Program
		q.Ramps = make([]Ramp, 7)
		o.ProgramInto(&q)
		if !q.Equal(o.Program()) {
			t.Fatalf("ProgramInto %+v, Program %+v", q, o.Program())
		}
	}
	if raw < 1000 {
		t.Fatalf("only %d initial temperatures of 20000 need the rounding: the test does not exercise it", raw)
	}
	t.Logf("%d of 20000 initial temperatures come back only through the rounding", raw)
}

// The conversion is the file's: °C + 273.15, min × 60, °C/min ÷ 60.
func TestFileProgramUnits(t *testing.T) {
	p := FileProgram{InitialC: 50, InitialHoldMin: 1, Ramps: []FileRamp{{RateCMin: 12, FinalC: 240, HoldMin: 2}}}.Program()
	want := Program{Initial: 323.15, InitialHold: 60, Ramps: []Ramp{{Rate: 0.2, Final: 513.15, Hold: 120}}}
	if !p.Equal(want) {
		t.Fatalf("%+v, want %+v", p, want)
	}
	if (FileProgram{}).Program().Ramps != nil {
		t.Fatal("a program without ramps converts to one with ramps")
	}
}
