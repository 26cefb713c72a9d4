package report

import (
	"bytes"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

func demoText(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// Every string from the file reaches the figure inert: an SVG of a method
// with ESC and BEL in a compound name and the title is valid XML; the
// figure carries the method's title, clear of the top edge.
func TestFigureInertTitle(t *testing.T) {
	text := demoText(t)
	text = strings.Replace(text, `name = "limonene"`, `name = "limo\u001b]0;owned\u0007nene"`, 1)
	text = regexp.MustCompile(`(?m)^title = .*$`).ReplaceAllString(text, `title = "Citrus \u001b[31mblend"`)
	if !strings.Contains(text, `\u0007nene`) || !strings.Contains(text, "Citrus") {
		t.Fatal("fixture did not change")
	}
	s := simText(t, text)
	data, err := s.Figure("svg", 800, 500)
	if err != nil {
		t.Fatal(err)
	}
	mustParseSVG(t, data)
	if bytes.ContainsAny(data, "\x1b\x07") {
		t.Error("raw control characters in the SVG")
	}
	// the title's text element, and its baseline well below the top edge
	// (vgsvg flips y: a baseline at y="-483.6" in a 500 pt figure is
	// 16.4 pt below the top)
	re := regexp.MustCompile(`<text[^>]*y="-([0-9.]+)"[^>]*>[^<]*Citrus`)
	mt := re.FindSubmatch(data)
	if mt == nil {
		t.Fatal("SVG lacks the method title")
	}
	if y, _ := strconv.ParseFloat(string(mt[1]), 64); 500-y < 14 {
		t.Errorf("title baseline %.1f pt below the top: touches the top edge", 500-y)
	}
}

// A target that elutes after the program makes the run "not met" in the
// sheet and the figure's legend, naming it, even when the pairs that did
// elute meet the target.
func TestNotElutedTargetNotMet(t *testing.T) {
	text := demoText(t)
	text = strings.Replace(text, "rate_c_min = 12.0\nfinal_c = 240.0\nhold_min = 2.0", "rate_c_min = 3.0\nfinal_c = 180.0\nhold_min = 0.0", 1)
	s := simText(t, text)
	if s.Result.TargetsNotEluted == 0 || s.Result.MinResolution < s.Method.Goal.MinResolution {
		t.Fatalf("fixture: %d targets not eluted, Rs %.3f", s.Result.TargetsNotEluted, s.Result.MinResolution)
	}
	sheet := string(s.Sheet())
	if !strings.Contains(sheet, "not met") || !strings.Contains(sheet, "nootkatone does not elute") {
		t.Errorf("sheet does not say not met:\n%s", sheet)
	}
	data, err := s.Figure("svg", 800, 500)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(data, []byte("not met")) {
		t.Error("figure legend does not say not met")
	}
}
