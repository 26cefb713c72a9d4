package optimizer

import (
	"math/rand/v2"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
)

// The optimizer's oven (Oven.Model, ovenFromModel) and the method file's
// (methodfile.ProgramToModel, ProgramFromModel) are one conversion: both
// give identical programs, bit for bit, for every method in testdata and
// for random programs, on and off the keypad steps; a saved program comes
// back as saved.
func TestOvenConversionIsTheMethodFiles(t *testing.T) {
	var ovens []methodfile.Oven
	files, _ := filepath.Glob("../testdata/*.toml")
	for _, f := range files {
		if m, err := methodfile.ReadFile(f); err == nil {
			ovens = append(ovens, m.Oven)
		}
	}
	nFile := len(ovens)
	if nFile < 3 {
		t.Fatalf("only %d methods read from testdata", nFile)
	}
	rng := rand.New(rand.NewPCG(8, 9))
	for i := 0; i < 2000; i++ {
		o := methodfile.Oven{InitialC: roundGrid(-60+rng.Float64()*200, 0.1), InitialHoldMin: roundGrid(rng.Float64()*10, 0.01)}
		if i%2 == 1 { // off the steps
			o.InitialC, o.InitialHoldMin = -60+rng.Float64()*200, rng.Float64()*10
		}
		prev := o.InitialC
		for r := rng.IntN(5); r > 0; r-- {
			rp := methodfile.Ramp{RateCMin: roundGrid(0.1+rng.Float64()*60, 0.1), FinalC: roundGrid(prev+1+rng.Float64()*80, 0.1), HoldMin: roundGrid(rng.Float64()*5, 0.01)}
			if i%2 == 1 {
				rp = methodfile.Ramp{RateCMin: 0.1 + rng.Float64()*60, FinalC: prev + 1 + rng.Float64()*80, HoldMin: rng.Float64() * 5}
			}
			o.Ramps = append(o.Ramps, rp)
			prev = rp.FinalC
		}
		ovens = append(ovens, o)
	}
	for i, mo := range ovens {
		oo := Oven(mo)
		p, q := methodfile.ProgramToModel(mo), oo.Model()
		var into model.Program
		oo.modelInto(&into)
		if !p.Equal(q) || !p.Equal(into) {
			t.Fatalf("oven %d %+v: method file %+v, optimizer %+v, %+v", i, mo, p, q, into)
		}
		back, obak := methodfile.ProgramFromModel(p), ovenFromModel(p)
		if !reflect.DeepEqual(Oven(back), obak) {
			t.Fatalf("oven %d: program %+v back: method file %+v, optimizer %+v", i, p, back, obak)
		}
		if i < nFile || (i-nFile)%2 == 0 { // from a file, or on the keypad steps
			if !reflect.DeepEqual(back, mo) {
				t.Fatalf("oven %d %+v comes back as %+v", i, mo, back)
			}
		}
	}
}
