package methodfile

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
)

// Every outlet word of the file reads as its model.Outlet and is written back
// as the same word, in a method file and in a saved edit; the run's override
// in a runs file reads the same way.
func TestOutletRoundTrip(t *testing.T) {
	text := mustRead(t, demoPath)
	const atm = `outlet = "atmospheric"`
	if !strings.Contains(text, atm) {
		t.Fatal("the demo has no atmospheric outlet line")
	}
	runs, err := os.ReadFile("../../testdata/scouting.toml")
	if err != nil {
		t.Fatal(err)
	}
	demo := readDemo(t)
	words := map[model.Outlet]string{model.AtmosphericOutlet: "atmospheric", model.VacuumOutlet: "vacuum"}
	if len(model.Outlets) != len(words) {
		t.Fatalf("model.Outlets = %v, want %d outlets", model.Outlets, len(words))
	}
	for _, o := range model.Outlets {
		word := words[o]
		if o.String() != word {
			t.Errorf("%d: String %q, want %q", int(o), o.String(), word)
		}
		line := fmt.Sprintf("outlet = %q", word)
		edited := strings.Replace(text, atm, line, 1)
		m, err := Parse("m.toml", []byte(edited))
		if err != nil {
			t.Fatalf("%s: %v", word, err)
		}
		if m.Carrier.Outlet != o {
			t.Errorf("%s: read as %v", word, m.Carrier.Outlet)
		}
		car, err := m.ModelCarrier()
		if err != nil || car.Vacuum != (word == "vacuum") {
			t.Errorf("%s: model carrier vacuum %v (%v)", word, car.Vacuum, err)
		}
		data, err := Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		// Marshal writes literal strings (gas = 'helium')
		if marshalled := "outlet = '" + word + "'\n"; !bytes.Contains(data, []byte(marshalled)) {
			t.Errorf("%s: Marshal does not write %s:\n%s", word, marshalled, data)
		}
		back, err := Parse("m.toml", data)
		if err != nil || back.Carrier.Outlet != o {
			t.Errorf("%s: Marshal → Parse gives %v (%v)", word, back.Carrier.Outlet, err)
		}
		// an edit of the outlet alone changes that one line of the file,
		// in the file's own quotes
		d := demo.Clone()
		d.Carrier.Outlet = o
		saved, inPlace, err := Update(demoPath, []byte(text), d)
		if err != nil || !inPlace {
			t.Fatalf("%s: Update in place %v: %v", word, inPlace, err)
		}
		if want := strings.Replace(text, atm, `outlet = "`+word+`"`, 1); word != "atmospheric" && string(saved) != want {
			t.Errorf("%s: the saved file is not the demo with its outlet line changed:\n%s", word, saved)
		} else if word == "atmospheric" && string(saved) != text {
			t.Errorf("%s: saving the demo unchanged changed it:\n%s", word, saved)
		}
		// the run's override
		r := strings.Replace(string(runs), "[run.oven]", "[run.carrier]\n"+line+"\n[run.oven]", 1)
		rs, err := ParseRuns("r.toml", []byte(r), demo)
		if err != nil {
			t.Fatalf("%s: runs: %v", word, err)
		}
		if got := demo.RunMethod(&rs.Runs[0]).Carrier.Outlet; got != o {
			t.Errorf("%s: run 1's outlet %v", word, got)
		}
		if got := demo.RunMethod(&rs.Runs[1]).Carrier.Outlet; got != demo.Carrier.Outlet {
			t.Errorf("%s: run 2 (no override) has outlet %v", word, got)
		}
	}
}

// A word that is not an outlet is refused with the message the plain-string
// outlet gave (recorded from the code before model.Outlet), its text quoted
// inert as every text from a file is; an outlet set in code to no outlet is
// refused by Validate at the same key.
func TestOutletBadWord(t *testing.T) {
	text := mustRead(t, demoPath)
	runs, err := os.ReadFile("../../testdata/scouting.toml")
	if err != nil {
		t.Fatal(err)
	}
	demo := readDemo(t)
	cases := []struct{ word, quoted string }{
		{"space", `"space"`},
		{"Vacuum", `"Vacuum"`},
		{" vacuum", `" vacuum"`},
		{"", `""`},
		{"vacuüm", `"vacuüm"`},
		{`a\b`, `"a\b"`},
		{"\x1b[31mvac\u202e", `"\x1b[31mvac\u202e"`},
		{`say "x"`, `"say "x""`},
	}
	for _, c := range cases {
		lit := fmt.Sprintf("%q", c.word)
		edited := strings.Replace(text, `outlet = "atmospheric"`, "outlet = "+lit, 1)
		_, err := Parse("m.toml", []byte(edited))
		want := "m.toml:17: carrier.outlet: " + c.quoted + " is not one of atmospheric, vacuum"
		if err == nil || err.Error() != want {
			t.Errorf("%q: %v\nwant %s", c.word, err, want)
		}
		r := strings.Replace(string(runs), "[run.oven]", "[run.carrier]\noutlet = "+lit+"\n[run.oven]", 1)
		_, err = ParseRuns("r.toml", []byte(r), demo)
		want = "r.toml:7: run[1].carrier.outlet: " + c.quoted + " is not one of atmospheric, vacuum"
		if err == nil || err.Error() != want {
			t.Errorf("runs %q: %v\nwant %s", c.word, err, want)
		}
	}
	m := demo.Clone()
	m.Carrier.Outlet = model.Outlet(7)
	verr := m.Validate()
	var ve *Error
	if !errors.As(verr, &ve) || ve.Key != "carrier.outlet" || ve.Line != 17 || ve.Msg != `"Outlet(7)" is not one of atmospheric, vacuum` {
		t.Errorf("Validate: %v", verr)
	}
	if kerr := m.ValidateKey("carrier.outlet"); kerr == nil || kerr.Error() != verr.Error() {
		t.Errorf("ValidateKey = %v, Validate = %v", kerr, verr)
	}
}
