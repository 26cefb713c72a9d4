package methodfile

import (
	"bytes"
	"fmt"
	"math/rand"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
)

const commentedPath = "../../testdata/commented.toml"

func readCommented(t *testing.T) ([]byte, *Method) {
	t.Helper()
	data, err := os.ReadFile(commentedPath)
	if err != nil {
		t.Fatal(err)
	}
	m, err := Parse(commentedPath, data)
	if err != nil {
		t.Fatal(err)
	}
	return data, m
}

// lineDiff lists the lines removed from a and added in b (a plain LCS line
// diff, enough to count changed lines).
func lineDiff(a, b string) (removed, added []string) {
	x, y := strings.Split(a, "\n"), strings.Split(b, "\n")
	// Equal lines at both ends are no part of the diff.
	for len(x) > 0 && len(y) > 0 && x[0] == y[0] {
		x, y = x[1:], y[1:]
	}
	for len(x) > 0 && len(y) > 0 && x[len(x)-1] == y[len(y)-1] {
		x, y = x[:len(x)-1], y[:len(y)-1]
	}
	n, m := len(x), len(y)
	dp := make([][]int, n+1)
	for i := range dp {
		dp[i] = make([]int, m+1)
	}
	for i := n - 1; i >= 0; i-- {
		for j := m - 1; j >= 0; j-- {
			if x[i] == y[j] {
				dp[i][j] = dp[i+1][j+1] + 1
			} else {
				dp[i][j] = max(dp[i+1][j], dp[i][j+1])
			}
		}
	}
	i, j := 0, 0
	for i < n && j < m {
		switch {
		case x[i] == y[j]:
			i++
			j++
		case dp[i+1][j] >= dp[i][j+1]:
			removed = append(removed, x[i])
			i++
		default:
			added = append(added, y[j])
			j++
		}
	}
	removed = append(removed, x[i:]...)
	added = append(added, y[j:]...)
	return
}

func comments(s string) []string {
	var out []string
	for _, l := range strings.Split(s, "\n") {
		if i := strings.Index(l, "#"); i >= 0 && !strings.Contains(l[:i], `"`) {
			out = append(out, strings.TrimSpace(l[i:]))
		}
	}
	return out
}

func update(t *testing.T, orig []byte, m *Method) string {
	t.Helper()
	out, inPlace, err := Update("m.toml", orig, m)
	if err != nil {
		t.Fatal(err)
	}
	if !inPlace {
		t.Fatal("fell back to a full rewrite")
	}
	got, err := Parse("m.toml", out)
	if err != nil {
		t.Fatalf("result does not parse: %v\n%s", err, out)
	}
	want, _ := Marshal(m)
	if again, _ := Marshal(got); !bytes.Equal(again, want) {
		t.Fatal("result does not mean the method")
	}
	return string(out)
}

// The round trip the issue asks for: one value changed in a heavily
// commented file gives a one-line diff, every comment kept.
func TestUpdateOneValueOneLine(t *testing.T) {
	orig, m := readCommented(t)
	m.Oven.Ramps[0].FinalC = 160
	out := update(t, orig, m)
	rem, add := lineDiff(string(orig), out)
	if len(rem) != 1 || len(add) != 1 {
		t.Fatalf("diff -%q +%q", rem, add)
	}
	if rem[0] != "final_c    = 150.0" || add[0] != "final_c    = 160.0" {
		t.Errorf("diff -%q +%q", rem, add)
	}
	if c0, c1 := comments(string(orig)), comments(out); strings.Join(c0, "|") != strings.Join(c1, "|") {
		t.Errorf("comments changed:\n%q\n%q", c0, c1)
	}
}

// A value with a comment after it keeps the comment; a single-quoted string
// changes only inside its line.
func TestUpdateKeepsTrailingComment(t *testing.T) {
	orig, m := readCommented(t)
	m.Column.MaxTempC = 320
	m.Title = "Citrus check mix, v2"
	out := update(t, orig, m)
	rem, add := lineDiff(string(orig), out)
	if len(rem) != 2 || len(add) != 2 {
		t.Fatalf("diff -%q +%q", rem, add)
	}
	if !strings.Contains(out, "max_temp_c  = 320       # maker's isothermal limit\n") {
		t.Errorf("comment after the value lost:\n%s", out)
	}
	if !strings.Contains(out, `title = 'Citrus check mix, v2'   # single quotes on purpose`) {
		t.Errorf("title line:\n%s", out)
	}
}

// Nothing changed: the file comes back byte for byte.
func TestUpdateUnchangedIsIdentical(t *testing.T) {
	orig, m := readCommented(t)
	if out := update(t, orig, m); out != string(orig) {
		t.Error("unchanged method rewrote the file")
	}
}

// A removed compound goes with the comment lines right above it; the others
// and their comments are untouched.
func TestUpdateRemoveCompound(t *testing.T) {
	orig, m := readCommented(t)
	m.Compounds = append(m.Compounds[:2], m.Compounds[3:]...) // alpha-pinene
	out := update(t, orig, m)
	rem, add := lineDiff(string(orig), out)
	if len(add) != 0 {
		t.Errorf("added %q", add)
	}
	if strings.Contains(out, "alpha-pinene") || strings.Contains(out, "the pinenes come close") {
		t.Errorf("removed compound left:\n%s", out)
	}
	if len(rem) != 8 { // comment, header, 5 keys, blank line
		t.Errorf("removed %d lines: %q", len(rem), rem)
	}
}

// An added compound goes after the last one, before the closing comment.
func TestUpdateAddCompound(t *testing.T) {
	orig, m := readCommented(t)
	c := m.Compounds[4]
	c.Name = "gamma-terpinene"
	c.DHkJ, c.DS = -61.04, -106.92
	m.Compounds = append(m.Compounds, c)
	out := update(t, orig, m)
	rem, _ := lineDiff(string(orig), out)
	if len(rem) != 0 {
		t.Errorf("removed %q", rem)
	}
	if !strings.Contains(out, "amount = 3.0    # the big one\n\n[[compound]]\nname = 'gamma-terpinene'") {
		t.Errorf("not placed after the last compound:\n%s", out)
	}
	if !strings.HasSuffix(out, "# end of the list\n") {
		t.Errorf("closing comment moved:\n%s", out)
	}
}

// A removed ramp's table is removed; a new key goes to the end of its own
// table; a table the file lacked is added whole.
func TestUpdateRampKeyAndTable(t *testing.T) {
	orig, m := readCommented(t)
	m.Oven.Ramps = m.Oven.Ramps[1:]
	m.Goal.Ramps = 1
	m.Column.HasCapacity, m.Column.CapacityNG = true, 50
	m.Injection.Present, m.Injection.VolumeUL, m.Injection.SplitRatio = true, 1, 20
	out := update(t, orig, m)
	if strings.Contains(out, "first ramp: the lights") || strings.Count(out, "[[oven.ramp]]") != 1 {
		t.Errorf("ramp not removed:\n%s", out)
	}
	if !strings.Contains(out, "max_temp_c  = 325       # maker's isothermal limit\ncapacity_ng = 50.0\n") {
		t.Errorf("new key not at the end of its table:\n%s", out)
	}
	if !strings.Contains(out, "[injection]\n") || !strings.Contains(out, "hold_min   = 2.0        # bake a little") {
		t.Errorf("table not added or ramp lost:\n%s", out)
	}
}

// Removing an optional value removes its line only.
func TestUpdateRemoveKey(t *testing.T) {
	orig, m := readCommented(t)
	m.Column.Phase = ""
	out := update(t, orig, m)
	rem, add := lineDiff(string(orig), out)
	if len(rem) != 1 || len(add) != 0 || !strings.HasPrefix(rem[0], "phase") {
		t.Errorf("diff -%q +%q", rem, add)
	}
}

// CRLF files stay CRLF, a BOM stays.
func TestUpdateCRLFAndBOM(t *testing.T) {
	orig, m := readCommented(t)
	crlf := append([]byte("\xEF\xBB\xBF"), bytes.ReplaceAll(orig, []byte("\n"), []byte("\r\n"))...)
	m.Column.HasCapacity, m.Column.CapacityNG = true, 50
	m.Oven.InitialC = 45
	out, inPlace, err := Update("m.toml", crlf, m)
	if err != nil || !inPlace {
		t.Fatal(err, inPlace)
	}
	if !bytes.HasPrefix(out, []byte("\xEF\xBB\xBF")) || bytes.Count(out, []byte("\n")) != bytes.Count(out, []byte("\r\n")) {
		t.Errorf("line ends or BOM changed: %q", out[:80])
	}
}

// Random edits of many kinds on the commented file and on the demo: every
// result means the edited method, and none falls back to a full rewrite.
func TestUpdateRandomEdits(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	origC, _ := readCommented(t)
	origD, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	for trial := 0; trial < 300; trial++ {
		orig := origC
		if trial%2 == 1 {
			orig = origD
		}
		m, err := Parse("m.toml", orig)
		if err != nil {
			t.Fatal(err)
		}
		for k := 0; k < 1+rng.Intn(4); k++ {
			switch rng.Intn(11) {
			case 8:
				if len(m.Limits.RateBands) == 0 {
					m.Limits.RateBands = append(m.Limits.RateBands, RateBand{AboveC: 200, MaxRateCMin: 20})
				} else {
					m.Limits.RateBands = nil
				}
			case 9:
				m.Goal.Robust.OvenOffsetC = float64(rng.Intn(3))
			case 10:
				m.Limits.MaxRateCMin = float64(40 + rng.Intn(60))
			case 0:
				m.Oven.InitialC = 35 + float64(rng.Intn(40))
			case 1:
				if len(m.Oven.Ramps) > 1 {
					i := rng.Intn(len(m.Oven.Ramps))
					m.Oven.Ramps = append(m.Oven.Ramps[:i:i], m.Oven.Ramps[i+1:]...)
				}
			case 2:
				if len(m.Oven.Ramps) < 4 {
					last := m.Oven.Ramps[len(m.Oven.Ramps)-1]
					last.FinalC = min(last.FinalC+10, m.Column.MaxTempC)
					m.Oven.Ramps = append(m.Oven.Ramps, last)
				}
			case 3:
				if len(m.Compounds) > 2 {
					i := rng.Intn(len(m.Compounds))
					m.Compounds = append(m.Compounds[:i:i], m.Compounds[i+1:]...)
				}
			case 4:
				c := m.Compounds[rng.Intn(len(m.Compounds))]
				c.Name = fmt.Sprintf("added %d", rng.Intn(1e6))
				i := rng.Intn(len(m.Compounds) + 1)
				m.Compounds = append(m.Compounds[:i], append([]Compound{c}, m.Compounds[i:]...)...)
			case 5:
				i := rng.Intn(len(m.Compounds))
				m.Compounds[i].Amount = float64(1+rng.Intn(30)) / 10
			case 6:
				m.Column.Phase = []string{"", "wax", m.Column.Phase}[rng.Intn(3)]
			case 7:
				m.Title = []string{"", "new title", m.Title}[rng.Intn(3)]
			}
		}
		if _, err := Parse("check", mustMarshal(t, m)); err != nil {
			continue // an edit made an invalid method; not this test's subject
		}
		update(t, orig, m)
	}
}

func mustMarshal(t *testing.T, m *Method) []byte {
	b, err := Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// WriteFile over an existing method keeps its comments.
func TestWriteFileKeepsComments(t *testing.T) {
	orig, m := readCommented(t)
	p := filepath.Join(t.TempDir(), "m.toml")
	os.WriteFile(p, orig, 0o644)
	m.Oven.InitialC = 45
	if err := WriteFile(p, m); err != nil {
		t.Fatal(err)
	}
	now, _ := os.ReadFile(p)
	rem, add := lineDiff(string(orig), string(now))
	if len(rem) != 1 || len(add) != 1 {
		t.Errorf("diff -%q +%q", rem, add)
	}
}

// A UTF-8 byte order mark is accepted; UTF-16 (both byte orders, with or
// without a mark) says to save the file as UTF-8.
func TestBOMAndUTF16(t *testing.T) {
	orig, _ := readCommented(t)
	if _, err := Parse("m.toml", append([]byte("\xEF\xBB\xBF"), orig...)); err != nil {
		t.Errorf("BOM refused: %v", err)
	}
	le := func(s []byte, bom bool, big bool) []byte {
		var out []byte
		if bom {
			if big {
				out = append(out, 0xFE, 0xFF)
			} else {
				out = append(out, 0xFF, 0xFE)
			}
		}
		for _, c := range s {
			if big {
				out = append(out, 0, c)
			} else {
				out = append(out, c, 0)
			}
		}
		return out
	}
	for _, bom := range []bool{true, false} {
		for _, big := range []bool{true, false} {
			_, err := Parse("m.toml", le([]byte("title = 'x'\n[column]\nlength_m = 30\n"), bom, big))
			if err == nil || !strings.Contains(err.Error(), "save it as UTF-8") || !strings.Contains(err.Error(), "m.toml") {
				t.Errorf("bom %v big %v: %v", bom, big, err)
			}
		}
	}
}

// bigCommented is the commented file with n compounds (copies of its own
// under new names), and the method it means.
func bigCommented(b testing.TB, n int) ([]byte, *Method) {
	orig, err := os.ReadFile(commentedPath)
	if err != nil {
		b.Fatal(err)
	}
	s := string(orig)
	i := strings.Index(s, "# solvent, not a target")
	head, block := s[:i], s[i:strings.Index(s, "# end of the list")]
	var sb strings.Builder
	sb.WriteString(head)
	for k := 0; sb.Len() < 1 || k*5 < n; k++ {
		sb.WriteString(strings.NewReplacer(`name = "`, fmt.Sprintf(`name = "%d `, k)).Replace(block))
	}
	data := []byte(sb.String())
	m, err := Parse("big.toml", data)
	if err != nil {
		b.Fatal(err)
	}
	return data, m
}

// One value changed in a 2000-compound commented file: the whole save
// text (Update: diff, placement, re-parse check).
func BenchmarkUpdate2000(b *testing.B) {
	orig, m := bigCommented(b, 2000)
	m.Compounds[1000].Amount = 2.5
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, inPlace, err := Update("big.toml", orig, m); err != nil || !inPlace {
			b.Fatal(err, inPlace)
		}
	}
}

// A compound removed from the middle of 2000, and every compound changed
// (what a fit does): both placed in the text, not rewritten.
func TestUpdateBigEdits(t *testing.T) {
	orig, m := bigCommented(t, 2000)
	if len(m.Compounds) != 2000 {
		t.Fatalf("%d compounds", len(m.Compounds))
	}
	rm := m.Clone()
	rm.Compounds = append(rm.Compounds[:700:700], rm.Compounds[701:]...)
	out := update(t, orig, rm)
	r, a := lineDiff(string(orig), out)
	if len(a) != 0 || len(r) > 9 {
		t.Errorf("removing one compound: -%d +%d lines", len(r), len(a))
	}
	all := m.Clone()
	for i := range all.Compounds {
		all.Compounds[i].DHkJ -= 0.5
	}
	out = update(t, orig, all)
	ol, nl := strings.Split(string(orig), "\n"), strings.Split(out, "\n")
	if len(ol) != len(nl) {
		t.Fatalf("changing every ΔH: %d lines became %d", len(ol), len(nl))
	}
	changed := 0
	for i := range ol {
		if ol[i] != nl[i] {
			changed++
			if !strings.HasPrefix(nl[i], "dH_kJ_mol = ") {
				t.Fatalf("line %d changed: %q → %q", i+1, ol[i], nl[i])
			}
		}
	}
	if changed != 2000 {
		t.Errorf("changing every ΔH changed %d lines, want 2000", changed)
	}
}

// Parsing a 2000-compound method (locating every key's line included).
func BenchmarkParse2000(b *testing.B) {
	orig, _ := bigCommented(b, 2000)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Parse("big.toml", orig); err != nil {
			b.Fatal(err)
		}
	}
}

// Layouts other than one table per header: quoted keys and a dotted key
// are placed in the text; inline tables for the ramps defeat the placer,
// and then the method is written fresh (still exactly the method).
func TestUpdateOtherLayouts(t *testing.T) {
	orig, _ := readCommented(t)
	s := string(orig)
	quoted := strings.Replace(s, "diameter_mm = 0.25", `"diameter_mm" = 0.25`, 1)
	goal := "[goal]\nmin_resolution = 1.5\nobjective = \"run-time\"\nramps = 2\n"
	dotted := strings.Replace(strings.Replace(s, goal, "", 1), "# --- hardware", "goal.min_resolution = 1.5\ngoal.objective = \"run-time\"\ngoal.ramps = 2\n\n# --- hardware", 1)
	inline := s[:strings.Index(s, "# first ramp")] + "ramp = [{rate_c_min = 10.0, final_c = 150.0}, {rate_c_min = 20.0, final_c = 240.0, hold_min = 2.0}]\n\n" + s[strings.Index(s, "[goal]"):]
	for _, tc := range []struct {
		name    string
		text    string
		inPlace bool
	}{{"quoted", quoted, true}, {"dotted", dotted, true}, {"inline", inline, false}} {
		m, err := Parse("m.toml", []byte(tc.text))
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		m.Column.DiameterMM = 0.32
		m.Carrier.Gas = model.Hydrogen
		m.Oven.InitialC = 45
		m.Goal.MinResolution = 2
		out, inPlace, err := Update("m.toml", []byte(tc.text), m)
		if err != nil {
			t.Fatal(err)
		}
		got, err := Parse("m.toml", out)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		want, _ := Marshal(m)
		if again, _ := Marshal(got); !bytes.Equal(again, want) {
			t.Errorf("%s: result means another method", tc.name)
		}
		if inPlace != tc.inPlace {
			t.Errorf("%s: in place %v, want %v", tc.name, inPlace, tc.inPlace)
		}
		if inPlace {
			r, a := lineDiff(tc.text, string(out))
			if len(r) != 4 || len(a) != 4 {
				t.Errorf("%s: diff -%q +%q", tc.name, r, a)
			}
		}
	}
}

// A key new to a table the file writes as dotted keys joins them, dotted.
func TestUpdateDottedNewKey(t *testing.T) {
	orig, _ := readCommented(t)
	goal := "[goal]\nmin_resolution = 1.5\nobjective = \"run-time\"\nramps = 2\n"
	text := strings.Replace(strings.Replace(string(orig), goal, "", 1), "# --- hardware", "goal.min_resolution = 1.5\ngoal.ramps = 2\n\n# --- hardware", 1)
	m, err := Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	m.Goal.TailMin = 1
	out := update(t, []byte(text), m)
	if !strings.Contains(out, "goal.ramps = 2\ngoal.tail_min = 1.0\n") {
		t.Errorf("not joined to the dotted keys:\n%s", out[:400])
	}
}
