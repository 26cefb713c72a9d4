package methodfile

import (
	"os"
	"strings"
	"testing"
)

// Keys are matched by their exact spelling: a key that differs from the
// format's name only in case is refused with a suggestion, in method files
// and runs files, wherever it is written (plain, dotted, inline table).
func TestExactKeySpelling(t *testing.T) {
	base, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, from, to, key, want string
	}{
		{"compound", "dH_kJ_mol", "dH_kj_mol", "compound[1].dH_kj_mol", "did you mean dH_kJ_mol?"},
		{"upper", "dH_kJ_mol", "DH_KJ_MOL", "compound[1].DH_KJ_MOL", "did you mean dH_kJ_mol?"},
		{"table", "[column]", "[Column]", "Column", "did you mean column?"},
		{"column key", "length_m", "Length_M", "column.Length_M", "did you mean length_m?"},
		{"ramp", "rate_c_min = 12.0", "Rate_C_Min = 12.0", "oven.ramp[1].Rate_C_Min", "did you mean rate_c_min?"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := strings.Replace(string(base), c.from, c.to, 1)
			if text == string(base) {
				t.Fatal("fixture did not change")
			}
			_, err := Parse("m.toml", []byte(text))
			if err == nil {
				t.Fatal("accepted")
			}
			fe, ok := err.(*Error)
			if !ok || fe.Line == 0 || fe.Key != c.key || !strings.Contains(fe.Msg, "unknown key") || !strings.Contains(fe.Msg, c.want) {
				t.Errorf("got %q (key %q), want key %q and %q", err, fe.Key, c.key, c.want)
			}
		})
	}
	// dotted and inline spellings
	// (on the demo without its own [goal.robust], which would clash)
	noRobust := withoutSecondWave(string(base))
	for _, text := range []string{
		strings.Replace(noRobust, "[goal]\n", "[goal]\nRobust.flow_pct = 2.0\n", 1),
		strings.Replace(noRobust, "[goal]\n", "[goal]\nrobust = { Flow_Pct = 2.0 }\n", 1),
	} {
		if text == string(base) {
			t.Fatal("fixture did not change")
		}
		if _, err := Parse("m.toml", []byte(text)); err == nil || !strings.Contains(err.Error(), "did you mean") {
			t.Errorf("dotted/inline wrong case: %v", err)
		}
	}
	m := readDemo(t)
	runs, err := os.ReadFile("../../testdata/scouting.toml")
	if err != nil {
		t.Fatal(err)
	}
	bad := strings.Replace(string(runs), "holdup_min", "Holdup_Min", 1)
	_, err = ParseRuns("r.toml", []byte(bad), m)
	if err == nil || !strings.Contains(err.Error(), "r.toml:5: run[1].Holdup_Min: unknown key (did you mean holdup_min?)") {
		t.Errorf("runs file: %v", err)
	}
	bad = strings.Replace(string(runs), "[run.oven]", "[run.Oven]", 1)
	if _, err = ParseRuns("r.toml", []byte(bad), m); err == nil || !strings.Contains(err.Error(), "run[1].Oven: unknown key (did you mean oven?)") {
		t.Errorf("runs file table: %v", err)
	}
}

// A save over a file never writes a second spelling of a key: a file with
// a key in the wrong case is not patched in place (adding dH_kJ_mol beside
// dH_kj_mol).
func TestUpdateNoSecondSpelling(t *testing.T) {
	base, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	orig := []byte(strings.Replace(string(base), "dH_kJ_mol", "dH_kj_mol", 1))
	m := readDemo(t)
	m.Compounds[0].DHkJ -= 1
	out, _, err := Update("m.toml", orig, m)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(out), "dH_kj_mol") {
		t.Errorf("saved text keeps the wrong spelling beside the right one:\n%s", out)
	}
	if _, err := Parse("m.toml", out); err != nil {
		t.Errorf("saved text does not read back: %v", err)
	}
}

// Names in error messages are shown by textsafe.Inert, the same way in
// every message (not Go's %q: \a for BEL, \\ doubled on the way out).
func TestErrorNamesInert(t *testing.T) {
	base, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	evil := `ethanol\u001b]0;owned\u0007x`
	text := strings.Replace(string(base), `name = "ethanol"`, `name = "`+evil+`"`, 1)
	text = strings.Replace(text, `name = "hexanal"`, `name = "`+evil+`"`, 1)
	_, err = Parse("m.toml", []byte(text))
	want := `duplicate compound name "ethanol\x1b]0;owned\x07x" (also compound 1)`
	if err == nil || !strings.HasSuffix(err.Error(), want) {
		t.Errorf("got %v, want …%s", err, want)
	}
	text = strings.Replace(string(base), `gas = "helium"`, "gas = \"he\\u001blium\"", 1)
	if _, err = Parse("m.toml", []byte(text)); err == nil || strings.ContainsAny(err.Error(), "\x1b") {
		t.Errorf("gas: %v", err)
	}
}

// A wrong type in a runs file reads as in a method file, in plain words,
// with the run's element in the key.
func TestRunsWrongTypePlainWords(t *testing.T) {
	m := readDemo(t)
	runs, err := os.ReadFile("../../testdata/scouting.toml")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ from, to, want string }{
		{`"ethanol" = 1.7672`, `"ethanol" = "1.7672"`, "r.toml:14: run[1].retention_min.ethanol: wrong type: expected a number, got string"},
		{"holdup_min = 1.7521", `holdup_min = "1.75"`, "r.toml:5: run[1].holdup_min: wrong type: expected a number, got string"},
	} {
		bad := strings.Replace(string(runs), c.from, c.to, 1)
		if bad == string(runs) {
			t.Fatal("fixture did not change")
		}
		if _, err := ParseRuns("r.toml", []byte(bad), m); err == nil || err.Error() != c.want {
			t.Errorf("got %v, want %s", err, c.want)
		}
	}
}

// An unknown key close to a name of the format gets the name suggested.
func TestUnknownKeySuggestion(t *testing.T) {
	base, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(base), "film_um = 0.25", "flim_um = 0.25", 1)
	if _, err := Parse("m.toml", []byte(text)); err == nil || err.Error() != "m.toml:9: column.flim_um: unknown key (did you mean film_um?)" {
		t.Errorf("typo: %v", err)
	}
	text = strings.Replace(string(base), "film_um = 0.25", "film_um = 0.25\ncolour = 3", 1)
	if _, err := Parse("m.toml", []byte(text)); err == nil || strings.Contains(err.Error(), "did you mean") {
		t.Errorf("far from any name: %v", err)
	}
}
