package methodfile

import (
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
)

// update applies edit to the method of text and returns the saved text,
// failing when the layout was not kept.
func updateWith(t *testing.T, text string, edit func(m *Method)) string {
	t.Helper()
	m, err := Parse("q.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	edit(m)
	out, kept, err := Update("q.toml", []byte(text), m)
	if err != nil || !kept {
		t.Fatalf("not kept in place (%v):\n%s", err, out)
	}
	return string(out)
}

// A changed string keeps the quotes the file wrote it with.
func TestUpdateKeepsQuoteStyle(t *testing.T) {
	data, _ := readCommented(t)
	text := string(data)
	out := updateWith(t, text, func(m *Method) { m.Carrier.Gas = model.Hydrogen })
	if rem, add := lineDiff(text, out); len(rem) != 1 || len(add) != 1 || add[0] != `gas  = "hydrogen"` {
		t.Errorf("gas line: %q → %q", rem, add)
	}
	// literal stays literal; a value a literal string cannot hold is
	// written as a basic string
	out = updateWith(t, text, func(m *Method) { m.Title = `Citrus "check" mix` })
	if _, add := lineDiff(text, out); len(add) != 1 || add[0] != `title = 'Citrus "check" mix'   # single quotes on purpose` {
		t.Errorf("title line: %q", add)
	}
	out = updateWith(t, text, func(m *Method) { m.Title = "Citrus check mix, Bob's copy" })
	if _, add := lineDiff(text, out); len(add) != 1 || add[0] != `title = "Citrus check mix, Bob's copy"   # single quotes on purpose` {
		t.Errorf("title line: %q", add)
	}
	// a basic string takes what needs escaping, escaped
	out = updateWith(t, text, func(m *Method) { m.Compounds[1].Name = `hexanal "C6"` })
	if _, add := lineDiff(text, out); len(add) != 1 || add[0] != `name = "hexanal \"C6\""          # aldehyde` {
		t.Errorf("name line: %q", add)
	}
}

// Multi-line strings stay multi-line in their own style; an array of
// strings keeps the file's quotes.
func TestUpdateKeepsMultilineAndArrayQuotes(t *testing.T) {
	data, _ := readCommented(t)
	base := strings.Replace(string(data), "[goal]\n", "[goal]\nlock = [\"initial_c\"]\n", 1)
	base = strings.Replace(base, "# single quotes on purpose\n", "# single quotes on purpose\nnotes = \"\"\"\nfirst line\nsecond line\"\"\"\n", 1)
	out := updateWith(t, base, func(m *Method) { m.Notes = "first line\nsecond, changed" })
	if !strings.Contains(out, "notes = \"\"\"\nfirst line\nsecond, changed\"\"\"\n") {
		t.Errorf("notes not kept multi-line:\n%s", out)
	}
	lit := strings.Replace(base, "notes = \"\"\"\nfirst line\nsecond line\"\"\"", "notes = '''\nfirst line\nsecond line'''", 1)
	out = updateWith(t, lit, func(m *Method) { m.Notes = "first line\nsecond, changed" })
	if !strings.Contains(out, "notes = '''\nfirst line\nsecond, changed'''\n") {
		t.Errorf("literal notes not kept:\n%s", out)
	}
	out = updateWith(t, base, func(m *Method) {
		m.Goal.Lock = append(m.Goal.Lock, model.ProgramValue{Kind: model.RampRate, Ramp: 1})
	})
	if !strings.Contains(out, `lock = ["initial_c", "rate_1"]`) {
		t.Errorf("lock array quotes not kept: %q", lineOf(out, "lock ="))
	}
	// CRLF: no raw newline goes into a multi-line string (it would hold \r)
	crlf := strings.ReplaceAll(base, "\n", "\r\n")
	out = updateWith(t, crlf, func(m *Method) { m.Notes = "first line\nsecond, changed" })
	if m, err := Parse("q.toml", []byte(out)); err != nil || m.Notes != "first line\nsecond, changed" {
		t.Errorf("CRLF notes: %v %q", err, lineOf(out, "notes"))
	}
}

func lineOf(s, prefix string) string {
	for _, l := range strings.Split(s, "\n") {
		if strings.HasPrefix(strings.TrimSpace(l), prefix) {
			return l
		}
	}
	return ""
}

// A ramp the file does not have gets no line of another ramp, from
// Validate and ValidateKey alike; after ElementRemoved the later ramps
// keep their own lines.
func TestLinesOfElementsNotInFile(t *testing.T) {
	data, m := readCommented(t)
	m.Oven.Ramps = append(m.Oven.Ramps, Ramp{RateCMin: 500, FinalC: 300})
	for _, err := range []error{m.Validate(), m.ValidateKey("oven.ramp[3].rate_c_min")} {
		e, ok := err.(*Error)
		if !ok || e.Key != "oven.ramp[3].rate_c_min" || e.Line != 0 {
			t.Errorf("added ramp: %v", err)
		}
	}
	_, m = readCommented(t)
	m.Oven.Ramps = m.Oven.Ramps[1:]
	m.ElementRemoved("oven.ramp", 1)
	m.Oven.Ramps[0].RateCMin = 500
	want := 0
	for i, l := range strings.Split(string(data), "\n") {
		if strings.HasPrefix(l, "rate_c_min = 20.0") {
			want = i + 1
		}
	}
	if e, ok := m.ValidateKey("oven.ramp[1].rate_c_min").(*Error); !ok || e.Line != want || want == 0 {
		t.Errorf("after removing ramp 1: %v, want line %d", e, want)
	}
}

// Awkward titles in every quote style, LF and CRLF: always placed in the
// file (never written anew) and read back as set.
func TestUpdateQuotesAwkwardStrings(t *testing.T) {
	data, _ := readCommented(t)
	titles := []string{`plain`, `it's`, `say "hi"`, `back\slash`, "tab\there", "two\nlines", `'''`, `"""`, "\x01ctl", "ünï ✓", `'`, `"`, "ends with '", `ends with "`, "\nlead"}
	styles := []string{`'Citrus check mix (commented copy)'`, `"Citrus check mix (commented copy)"`, `"""Citrus check mix (commented copy)"""`, `'''Citrus check mix (commented copy)'''`, "'''\nCitrus'''", "\"\"\"\nCitrus\"\"\""}
	for _, crlf := range []bool{false, true} {
		for _, st := range styles {
			base := strings.Replace(string(data), `'Citrus check mix (commented copy)'`, st, 1)
			if crlf {
				base = strings.ReplaceAll(base, "\n", "\r\n")
			}
			for _, ti := range titles {
				m, err := Parse("q.toml", []byte(base))
				if err != nil {
					t.Fatalf("%s: %v", st, err)
				}
				m.Title = ti
				out, kept, err := Update("q.toml", []byte(base), m)
				if err != nil || !kept {
					t.Errorf("style %s, title %q, crlf %v: not kept (%v)", st, ti, crlf, err)
					continue
				}
				back, err := Parse("q.toml", out)
				if err != nil || back.Title != ti {
					t.Errorf("style %s, title %q: read back %q (%v)", st, ti, back.Title, err)
				}
			}
		}
	}
}
