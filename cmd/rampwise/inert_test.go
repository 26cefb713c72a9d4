package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/rampwise/rampwise/model/methodfile"
)

// hostileMethod is the demo with escape sequences and formula starts in
// every text a file can carry: OSC 0 (window title), OSC 52 (clipboard
// write), CSI 2J (clear screen), a C1 CSI, a bidi override, and cells that
// a spreadsheet would run (=, +, -, @).
func hostileMethod(t *testing.T) string {
	t.Helper()
	m, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	m.Title = "title \x1b]0;owned\x07 \x1b[2J"
	m.Notes = "line one \x1b]52;c;ZXZpbA==\x07\nline two \u009b31m"
	m.Column.Phase = "phase \u202egnp.exe"
	bad := []string{
		"=HYPERLINK(\"http://x\",\"y\")", "+cmd|' /C calc'!A0", "-2+3", "@SUM(A1:A2)",
		"osc52 \x1b]52;c;ZXZpbA==\x07", "clear \x1b[2J\x1b[H", "c1 \u009b2J", "bidi \u202eevil",
	}
	for i, n := range bad {
		m.Compounds[i].Name = n
	}
	p := filepath.Join(t.TempDir(), "hostile \x1b[31m.toml")
	if err := methodfile.WriteFile(p, m); err != nil {
		t.Fatal(err)
	}
	return p
}

// rawControl finds a byte that would drive a terminal: ESC or another C0
// control (other than newline and tab), DEL, a C1 control or a bidi
// override.
func rawControl(s string) (string, bool) {
	for i, r := range s {
		switch {
		case r == utf8.RuneError:
			return s[max(0, i-20):min(len(s), i+20)], true
		case r < 0x20 && r != '\n' && r != '\t', r == 0x7f, r >= 0x80 && r <= 0x9f,
			r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069:
			return s[max(0, i-20):min(len(s), i+20)], true
		}
	}
	return "", false
}

func checkCSV(t *testing.T, what string, data []byte) {
	t.Helper()
	recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", what, err)
	}
	for _, rec := range recs {
		for _, cell := range rec {
			if cell != "" && strings.ContainsRune("=+-@\t\r", rune(cell[0])) && !isNum(cell) {
				t.Errorf("%s: cell %q would run as a formula", what, cell)
			}
		}
	}
}

func isNum(s string) bool {
	var f float64
	_, err := fmtSscan(s, &f)
	return err == nil
}

// A method whose texts hold escape sequences produces no raw control byte
// in any text output (tables, sheet, CSV, JSON, messages), and no CSV cell
// that starts a formula (OWASP "CSV Injection": prefix such cells with a
// single quote).
func TestHostileTextIsInert(t *testing.T) {
	p := hostileMethod(t)
	dir := t.TempDir()
	sheet, peaks, sw := filepath.Join(dir, "s.md"), filepath.Join(dir, "p.csv"), filepath.Join(dir, "w.csv")
	cmpCSV := filepath.Join(dir, "c.csv")
	runs := [][]string{
		{"simulate", p},
		{"simulate", "--csv", p},
		{"simulate", "--json", p},
		{"optimize", p},
		{"export", "--sheet", sheet, "--csv", peaks, p},
		{"sweep", "--vary", "rate_1", "--from", "5", "--to", "30", "--steps", "4", "--csv", sw, p},
		{"index", p},
		{"compare", "--csv", cmpCSV, p},
		{"plan", p},
		{"plan", "--json", p},
		{"simulate", filepath.Join(dir, "missing \x1b]0;x\x07.toml")}, // an error naming the file
	}
	for _, args := range runs {
		_, out, stderr := runCmd(t, args...)
		for _, s := range []string{out, stderr} {
			if ctx, bad := rawControl(s); bad {
				t.Errorf("%v: raw control in output near %q", args, ctx)
			}
		}
		if args[0] == "simulate" && args[1] == "--csv" {
			checkCSV(t, "simulate --csv", []byte(out))
		}
		if args[0] == "simulate" && args[1] == "--json" {
			var j struct {
				Peaks []struct{ Name string } `json:"peaks"`
			}
			if err := json.Unmarshal([]byte(out), &j); err != nil {
				t.Fatalf("JSON broken by the filter: %v", err)
			}
			found := false
			for _, pk := range j.Peaks {
				found = found || pk.Name == "clear \x1b[2J\x1b[H"
			}
			if !found {
				t.Error("JSON lost the exact name (it must carry it, escaped)")
			}
		}
	}
	for _, f := range []string{sheet, peaks, sw, cmpCSV} {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		if ctx, bad := rawControl(string(data)); bad {
			t.Errorf("%s: raw control near %q", filepath.Base(f), ctx)
		}
		if strings.HasSuffix(f, ".csv") {
			checkCSV(t, filepath.Base(f), data)
		}
	}
}

// The stdout filter keeps a UTF-8 character cut between two writes.
func TestInertWriterSplitRune(t *testing.T) {
	var b bytes.Buffer
	iw := &inertWriter{w: &b}
	s := []byte("30 °C × \u009b")
	for i := range s {
		iw.Write(s[i : i+1])
	}
	iw.Flush()
	if b.String() != `30 °C × \u009b` {
		t.Errorf("%q", b.String())
	}
}

func fmtSscan(s string, f *float64) (int, error) { return fmt.Sscan(s, f) }
