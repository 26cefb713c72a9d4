package plan

import (
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// A name with terminal escapes and a bidi override stays inert in the
// [[run]] block and the block still parses as TOML with the same name.
func TestRunBlockInertAndParses(t *testing.T) {
	name := "evil\x1b[31m\u202Ename\"q\\"
	o := methodfile.Oven{InitialC: 40, InitialHoldMin: 1, Ramps: []methodfile.Ramp{{RateCMin: 10, FinalC: 250, HoldMin: 2}}}
	block := RunBlock(name, o, methodfile.Limits{}, []string{name})
	if strings.ContainsAny(block, "\x1b\u202E") {
		t.Fatalf("raw escape in the block: %q", block)
	}
	m, err := methodfile.Parse("m.toml", []byte(sampleText(1, []sampleCompound{{name: "a", dH: -40, dS: -80}})))
	if err != nil {
		t.Fatal(err)
	}
	runs, err := methodfile.ParseRuns("r.toml", []byte(strings.Replace(block, "[run.width_min]", "a = 5.0\n[run.width_min]", 1)), m)
	if err != nil {
		t.Fatalf("%v\n%s", err, block)
	}
	if runs.Runs[0].Name != name {
		t.Errorf("name %q, want %q", runs.Runs[0].Name, name)
	}
	if got := runs.Runs[0].Oven; got.InitialC != 40 || got.Ramps[0].FinalC != 250 || got.Ramps[0].HoldMin != 2 {
		t.Errorf("program %+v", got)
	}
}
