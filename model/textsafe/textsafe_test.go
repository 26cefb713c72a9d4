package textsafe

import (
	"strings"
	"testing"
)

func TestInertEscapesTerminalControls(t *testing.T) {
	cases := []struct{ in, want string }{
		{"toluene", "toluene"},
		{"α-pinene", "α-pinene"},
		{"\x1b]0;owned\x07", `\x1b]0;owned\x07`},             // OSC 0: window title
		{"\x1b]52;c;aGVsbG8=\x07", `\x1b]52;c;aGVsbG8=\x07`}, // OSC 52: clipboard write
		{"a\x1b[2Jb", `a\x1b[2Jb`},                           // CSI 2J: clear screen
		{"c1\u009b31m", `c1\u009b31m`},                       // C1 CSI
		{"bidi\u202eevil", `bidi\u202eevil`},                 // right-to-left override
		{"line\nnext\ttab\r", `line\nnext\ttab\r`},
		{"bad\xffbyte", `bad\xffbyte`},
		{`typed\x1b`, `typed\\x1b`},
		{"del\x7f", `del\x7f`},
	}
	for _, c := range cases {
		got := Inert(c.in)
		if got != c.want {
			t.Errorf("Inert(%q) = %q, want %q", c.in, got, c.want)
		}
		for _, b := range []byte(got) {
			if b < 0x20 || b == 0x7f {
				t.Errorf("Inert(%q) keeps control byte %#x", c.in, b)
			}
		}
	}
}

func TestInertCleanDoesNotAllocate(t *testing.T) {
	s := strings.Repeat("ethyl acetate ", 4)
	if n := testing.AllocsPerRun(100, func() { _ = Inert(s) }); n != 0 {
		t.Errorf("Inert on clean text allocates %v times", n)
	}
}

// The OWASP "CSV Injection" page lists =, +, -, @, tab and carriage return
// as the characters that start a formula; the cell gets a leading quote.
func TestCSVCellNeutralisesFormulas(t *testing.T) {
	cases := []struct{ in, want string }{
		{"=HYPERLINK(\"x\")", "'=HYPERLINK(\"x\")"},
		{"+cmd", "'+cmd"},
		{"-2+3", "'-2+3"},
		{"@SUM(A1)", "'@SUM(A1)"},
		{"\tx", `'\tx`},
		{"-1.5", "-1.5"},
		{"+2e3", "+2e3"},
		{"1.25", "1.25"},
		{"toluene", "toluene"},
		{"", ""},
	}
	for _, c := range cases {
		if got := CSVCell(c.in); got != c.want {
			t.Errorf("CSVCell(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

func FuzzInert(f *testing.F) {
	f.Add("\x1b]0;x\x07")
	f.Add("α\u202e")
	f.Fuzz(func(t *testing.T, s string) {
		out := Inert(s)
		for _, b := range []byte(out) {
			if b < 0x20 || b == 0x7f {
				t.Fatalf("Inert(%q) = %q keeps control byte %#x", s, out, b)
			}
		}
		if strings.ContainsRune(out, '\u009b') || strings.ContainsRune(out, '\u202e') {
			t.Fatalf("Inert(%q) = %q keeps a C1 or bidi control", s, out)
		}
		if Inert(out) != out && !strings.Contains(out, `\`) {
			t.Fatalf("Inert not idempotent on %q", out)
		}
	})
}

func TestMessageKeepsInertEscapes(t *testing.T) {
	in := `name "` + Inert("a\x1bb") + "\" and raw \x07"
	if got, want := Message(in), `name "a\x1bb" and raw \x07`; got != want {
		t.Errorf("Message = %q, want %q", got, want)
	}
}
