package main

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/optimizer"
)

// hydrogenDemo writes the demo method with hydrogen as its carrier and
// returns its path.
func hydrogenDemo(t *testing.T) string {
	t.Helper()
	text := strings.Replace(string(demoMethod), `gas = "helium"`, `gas = "hydrogen"`, 1)
	if text == string(demoMethod) {
		t.Fatal("the demo names no helium carrier to replace")
	}
	path := filepath.Join(t.TempDir(), "h2.toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// Every command that prints a program carries the hydrogen caution, in
// JSON as in text, and a CSV on stdout stays pure CSV with the caution on
// stderr.
func TestHydrogenCautionEverywhere(t *testing.T) {
	h2 := hydrogenDemo(t)
	var oj struct {
		Cautions []string `json:"cautions"`
	}
	code, out, errs := runCmd(t, "optimize", "--json", h2)
	if code != 0 && code != 3 {
		t.Fatalf("optimize --json: exit %d: %s", code, errs)
	}
	if err := jsonUnmarshal(out, &oj); err != nil {
		t.Fatal(err)
	}
	if len(oj.Cautions) == 0 || oj.Cautions[0] != model.HydrogenCaution {
		t.Errorf("optimize --json cautions = %q, want the hydrogen caution", oj.Cautions)
	}
	// a helium method has an empty array, not null
	code, out, _ = runCmd(t, "optimize", "--json", DemoArg)
	if code != 0 && code != 3 || !strings.Contains(out, `"cautions": []`) {
		t.Errorf("optimize --json on helium: exit %d, cautions not an empty array", code)
	}

	code, out, errs = runCmd(t, "simulate", "--csv", h2)
	if code != 0 {
		t.Fatalf("simulate --csv: exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, model.HydrogenCaution) {
		t.Errorf("simulate --csv: no hydrogen caution on stderr: %q", errs)
	}
	if strings.Contains(out, "flammable") || strings.Contains(out, "warning") {
		t.Errorf("simulate --csv: caution on stdout (not pure CSV):\n%s", out)
	}

	dir := t.TempDir()
	code, _, errs = runCmd(t, "export", h2, "--csv", filepath.Join(dir, "p.csv"))
	if code != 0 || !strings.Contains(errs, model.HydrogenCaution) {
		t.Errorf("export --csv: exit %d, no hydrogen caution on stderr: %q", code, errs)
	}
	code, out, errs = runCmd(t, "sweep", h2, "--vary", "rate_1", "--from", "5", "--to", "15", "--steps", "3", "--csv", filepath.Join(dir, "s.csv"))
	if code != 0 || !strings.Contains(out, "caution: "+model.HydrogenCaution) {
		t.Errorf("sweep: exit %d, no hydrogen caution: %q %q", code, out, errs)
	}
	code, out, errs = runCmd(t, "sweep", h2, "--vary", "rate_1", "--from", "5", "--to", "15", "--steps", "2", "--vary2", "initial_c", "--from2", "40", "--to2", "50", "--steps2", "2")
	if code != 0 || !strings.Contains(out, "caution: "+model.HydrogenCaution) {
		t.Errorf("sweep map: exit %d, no hydrogen caution: %q %q", code, out, errs)
	}
}

func jsonUnmarshal(s string, v any) error { return json.Unmarshal([]byte(s), v) }

// An output path that cannot be written is refused before the long work,
// exit 2, the message naming the path, and nothing is written.
func TestOutputPathCheckedFirst(t *testing.T) {
	dir := t.TempDir()
	missing := filepath.Join(dir, "nonexist", "x.toml")
	notDir := filepath.Join(dir, "plain")
	if err := os.WriteFile(notDir, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	searched := false
	saved := optimizeSearch
	optimizeSearch = func(ctx context.Context, p optimizer.Problem, s optimizer.Settings) (*optimizer.Result, error) {
		searched = true
		return saved(ctx, p, s)
	}
	defer func() { optimizeSearch = saved }()
	for _, bad := range []string{missing, dir, filepath.Join(notDir, "x.toml")} {
		searched = false
		code, out, errs := runCmd(t, "optimize", "--out", bad, DemoArg)
		if code != 2 || !strings.Contains(errs, bad) || searched || out != "" {
			t.Errorf("optimize --out %s: exit %d, searched %v, stdout %q, stderr %q", bad, code, searched, out, errs)
		}
	}
	// every other output path of every command
	png := filepath.Join(dir, "fig.png")
	cases := [][]string{
		{"export", DemoArg, "--png", png, "--csv", missing},
		{"export", DemoArg, "--png", png, "--sheet", dir},
		{"sweep", DemoArg, "--vary", "rate_1", "--from", "5", "--to", "15", "--steps", "3", "--png", png, "--csv", missing},
		{"sweep", DemoArg, "--vary", "rate_1", "--from", "5", "--to", "15", "--steps", "3", "--png", missing},
		{"compare", DemoArg, "--csv", missing},
		{"fit", DemoArg, "../../testdata/scouting.toml", "--out", missing},
		{"check", DemoArg, "../../testdata/scouting.toml", "--refit", "--out", missing},
	}
	for _, args := range cases {
		code, out, errs := runCmd(t, args...)
		if code != 2 || !strings.Contains(errs, missing) && !strings.Contains(errs, dir) || out != "" || strings.Contains(errs, "candidates optimized") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
		}
		if _, err := os.Stat(png); err == nil {
			t.Errorf("%v: wrote %s before refusing", args, png)
			os.Remove(png)
		}
	}
}

// Progress on a file or pipe is complete lines only, and the last line
// says the search is over (never a stale "best" of the unfinished
// search); on a terminal the bar is erased at the end.
func TestProgressNotTerminal(t *testing.T) {
	var b strings.Builder
	pp := newProgress(&b)
	if pp.tty {
		t.Fatal("a strings.Builder taken for a terminal")
	}
	for i := 0; i <= 60; i++ {
		pp.update(optimizer.Progress{Evaluations: 1000 * i, Feasible: true, Objective: float64(900 - 5*i), MinResolution: 1.6, Elapsed: time.Duration(i) * 250 * time.Millisecond})
	}
	pp.end()
	out := b.String()
	lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
	if strings.Contains(out, "\r") || !strings.HasSuffix(out, "\n") {
		t.Errorf("not complete lines: %q", out)
	}
	if len(lines) < 2 || len(lines) > 4 {
		t.Errorf("%d lines for 15 s of search (one every 5 s and the end): %q", len(lines), out)
	}
	if last := lines[len(lines)-1]; strings.Contains(last, "best") || !strings.Contains(last, "search over") {
		t.Errorf("last line %q: stale or not the end", last)
	}
	// a short search prints nothing at all
	b.Reset()
	pp = newProgress(&b)
	pp.update(optimizer.Progress{Evaluations: 10, Elapsed: time.Second})
	pp.end()
	if b.Len() != 0 {
		t.Errorf("a 1 s search printed %q", b.String())
	}
	// a terminal: the bar is redrawn in place and erased at the end
	b.Reset()
	pp = newProgress(&b)
	pp.tty = true
	pp.update(optimizer.Progress{Evaluations: 10, Elapsed: time.Second})
	pp.end()
	if out := b.String(); !strings.HasPrefix(out, "\r") || !strings.HasSuffix(out, "\r\033[K") {
		t.Errorf("terminal progress %q", out)
	}
	// the whole command on a buffer (not a terminal): no carriage return
	code, _, errs := runCmd(t, "optimize", DemoArg)
	if code != 0 || strings.Contains(errs, "\r") || errs != "" && !strings.HasSuffix(errs, "search over; the result follows on standard output\n") {
		t.Errorf("optimize: exit %d, stderr %q", code, errs)
	}
}

// optimize's text fits an 80-column terminal (warnings, one line each, may
// run on), and the programs are all there.
func TestOptimizeTextFits80(t *testing.T) {
	for _, args := range [][]string{{"optimize", DemoArg}, {"optimize", "--ramps", "5", DemoArg}} {
		code, out, errs := runCmd(t, args...)
		if code != 0 && code != 3 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		for _, l := range strings.Split(out, "\n") {
			if n := utf8.RuneCountInString(l); n > 80 && !strings.HasPrefix(l, "warning: ") {
				t.Errorf("%v: a line of %d columns: %q", args, n, l)
			}
		}
		if !strings.Contains(out, "program before: "+describeProgram(mustDemo(t).Oven)) {
			t.Errorf("%v: the program before is not on its own line:\n%s", args, out)
		}
	}
	// a row too wide for the table becomes two labelled lines
	var b strings.Builder
	long := strings.Repeat("a-very-long-compound-name ", 3)
	writeBeforeAfter(&b, [][3]string{{"run time (min)", "1.00", "2.00"}, {"critical pair", long, long}}, 80)
	for _, l := range strings.Split(strings.TrimSpace(b.String()), "\n") {
		if utf8.RuneCountInString(l) > 80 {
			t.Errorf("a line of %d columns: %q", utf8.RuneCountInString(l), l)
		}
	}
	if !strings.Contains(b.String(), "critical pair after:") || !strings.Contains(b.String(), "run time (min) before: 1.00") {
		t.Errorf("fallback layout:\n%s", b.String())
	}
}

func mustDemo(t *testing.T) *methodfile.Method {
	t.Helper()
	m, _, err := loadMethod(DemoArg)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// The simulate table labels its k column as the first-target caution
// names its k: k(Te), at the elution temperature.
func TestKLabelsAgree(t *testing.T) {
	code, out, errs := runCmd(t, "simulate", "../../testdata/bench20.toml")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "  k(Te)  ") {
		t.Errorf("the table's k column is not labelled k(Te):\n%s", out)
	}
	if !strings.Contains(out, "elutes with k(Te) = ") || !strings.Contains(out, "k at its elution temperature") {
		t.Errorf("the caution does not say which k:\n%s", out)
	}
}

// fit --json and fit's text carry the warning of a fitted diameter far
// from the column's (helium runs against a method switched to hydrogen).
func TestFitDiameterFarWarned(t *testing.T) {
	text := strings.Replace(string(demoMethod), `gas = "helium"`, `gas = "hydrogen"`, 1)
	text = strings.Replace(text, "flow_ml_min = 1.2", "flow_ml_min = 2.0", 1)
	path := filepath.Join(t.TempDir(), "h2.toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	var j struct {
		Warnings []string `json:"warnings"`
	}
	runJSON(t, &j, "fit", "--json", path, "../../testdata/scouting.toml")
	found := false
	for _, w := range j.Warnings {
		found = found || strings.HasPrefix(w, "column diameter") && strings.Contains(w, "[run.carrier]")
	}
	if !found {
		t.Errorf("fit --json warnings %q", j.Warnings)
	}
	_, out, _ := runCmd(t, "fit", path, "../../testdata/scouting.toml")
	if !strings.Contains(out, "warning: column diameter ") {
		t.Errorf("fit text:\n%s", out)
	}
}
