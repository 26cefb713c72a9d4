package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runJSON runs the command line args, which must exit 0, and decodes its
// standard output (JSON) into v.
func runJSON(t *testing.T, v any, args ...string) {
	t.Helper()
	code, out, errs := runCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if err := json.Unmarshal([]byte(out), v); err != nil {
		t.Fatal(err)
	}
}

// checkBadRunsCorpus runs cmd on the demo method with every file of the
// bad-runs corpus: each must exit 2 with a message naming the file and
// holding the fragment its expect.tsv line gives.
func checkBadRunsCorpus(t *testing.T, cmd string) {
	t.Helper()
	data, err := os.ReadFile("../../testdata/bad-runs/expect.tsv")
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		if strings.HasPrefix(line, "#") {
			continue
		}
		name, frag, _ := strings.Cut(line, "\t")
		path := filepath.Join("../../testdata/bad-runs", name)
		code, _, errs := runCmd(t, cmd, "../../testdata/demo.toml", path)
		if code != 2 || !strings.Contains(errs, path) || !strings.Contains(errs, frag) {
			t.Errorf("%s %s: exit %d, message %q (want %q)", cmd, name, code, errs, frag)
		}
	}
}
