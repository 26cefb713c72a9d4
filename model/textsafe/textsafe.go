// Package textsafe makes text that comes from a file (compound names,
// titles, phases, paths) safe to show on a terminal and to put in a CSV
// cell: control characters are shown as escapes, never sent raw, and cells
// that a spreadsheet would run as a formula are neutralised.
package textsafe

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Inert returns s with every character that could drive a terminal shown
// as a visible escape: C0 controls (ESC as \x1b, tab and newline as \t and
// \n), DEL, C1 controls (U+0080–U+009F, which some terminals take as CSI
// or OSC), the Unicode bidirectional controls that reorder text on screen
// (U+202A–U+202E, U+2066–U+2069, U+200E, U+200F, U+061C), and invalid UTF-8
// bytes. Everything else, including non-ASCII letters, is kept. A string
// without such characters is returned unchanged, without allocating.
func Inert(s string) string {
	if clean(s) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s) + 8)
	for i := 0; i < len(s); {
		r, n := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\t':
			b.WriteString(`\t`)
		case r == '\r':
			b.WriteString(`\r`)
		case r < 0x20 || r == 0x7f:
			fmt.Fprintf(&b, `\x%02x`, r)
		case unsafeRune(r):
			fmt.Fprintf(&b, `\u%04x`, r)
		case r == '\\' && i+1 < len(s) && (s[i+1] == 'x' || s[i+1] == 'u'):
			// A literal backslash before x or u is doubled so that an
			// escape shown cannot be mistaken for one typed in the file.
			b.WriteString(`\\`)
		default:
			b.WriteString(s[i : i+n])
		}
		i += n
	}
	return b.String()
}

// Message is Inert for a message whose names and values from files are
// already shown through Inert (the methodfile errors): controls are
// escaped the same way, but a backslash is left as it is, so that an
// escape Inert wrote (\x1b) is not doubled to \\x1b on the way out.
func Message(s string) string {
	var b strings.Builder
	for i := 0; i < len(s); {
		j := strings.IndexByte(s[i:], '\\')
		if j < 0 {
			b.WriteString(Inert(s[i:]))
			break
		}
		b.WriteString(Inert(s[i : i+j]))
		b.WriteByte('\\')
		i += j + 1
	}
	return b.String()
}

func clean(s string) bool {
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			if c < 0x20 || c == 0x7f || (c == '\\' && i+1 < len(s) && (s[i+1] == 'x' || s[i+1] == 'u')) {
				return false
			}
			i++
			continue
		}
		r, n := utf8.DecodeRuneInString(s[i:])
		if (r == utf8.RuneError && n == 1) || unsafeRune(r) {
			return false
		}
		i += n
	}
	return true
}

// unsafeRune reports C1 controls and the bidirectional formatting
// characters.
func unsafeRune(r rune) bool {
	switch {
	case r >= 0x80 && r <= 0x9f:
		return true
	case r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069, r == 0x200e, r == 0x200f, r == 0x061c:
		return true
	}
	return false
}

// CSVCell neutralises a cell that a spreadsheet would evaluate as a
// formula, as the OWASP "CSV Injection" guidance describes: a cell whose
// first character is =, +, -, @, tab or carriage return gets a leading
// single quote. A cell that is a plain number (such as -1.5 or +2e3) is a
// value, not a formula, and is kept as it is. Control characters are then
// made inert.
func CSVCell(s string) string {
	if s == "" {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r':
		if !isNumber(s) {
			s = "'" + s
		}
	}
	return Inert(s)
}

func isNumber(s string) bool {
	if s == "" {
		return false
	}
	digits := false
	for i, r := range s {
		switch {
		case unicode.IsDigit(r) && r < utf8.RuneSelf:
			digits = true
		case (r == '+' || r == '-') && (i == 0 || s[i-1] == 'e' || s[i-1] == 'E'):
		case r == '.' || r == 'e' || r == 'E':
		default:
			return false
		}
	}
	return digits
}
