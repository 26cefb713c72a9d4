//go:build unix

package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/rampwise/rampwise/model/methodfile"
)

// bigMethod writes the demo with n compounds (the demo's, repeated under
// new names with slightly shifted retention) to a temporary file.
func bigMethod(t *testing.T, n int) string {
	t.Helper()
	m, err := methodfile.ReadFile("../../testdata/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	base := m.Compounds
	m.Compounds = nil
	for i := 0; i < n; i++ {
		c := base[i%len(base)]
		c.Name = fmt.Sprintf("%s %d", c.Name, i)
		c.DHkJ -= 0.01 * float64(i/len(base))
		c.Formula = ""
		m.Compounds = append(m.Compounds, c)
	}
	path := filepath.Join(t.TempDir(), "big.toml")
	if err := methodfile.WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	return path
}

// signalTUI opens the UI on path, makes one edit, sends sig, and reports
// whether a recovery file with the edit was left and what stderr said.
func signalTUI(t *testing.T, path string, sig syscall.Signal, before string) (bool, string) {
	t.Helper()
	rp := path + ".rampwise-recovery.toml"
	os.Remove(rp)
	want, _ := methodfile.ReadFile(path)
	cmd := helper("tui", "--no-color", path)
	stdin, err := cmd.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	var out, errb syncBuffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	defer cmd.Process.Kill()
	waitOutput(t, &out, "program")
	stdin.Write([]byte("]")) // start temperature +10 °C
	waitOutput(t, &out, "modified")
	if before != "" {
		stdin.Write([]byte(before))
	}
	cmd.Process.Signal(sig)
	cmd.Wait()
	m, err := methodfile.ReadFile(rp)
	if err != nil {
		return false, errb.String()
	}
	return m.Oven.InitialC == want.Oven.InitialC+10, errb.String()
}

// Every exit signal writes the recovery file, with a dialog open too.
func TestEverySignalWritesRecovery(t *testing.T) {
	data, _ := os.ReadFile("../../testdata/demo.toml")
	for _, tc := range []struct {
		sig    syscall.Signal
		before string
	}{
		{syscall.SIGHUP, ""}, {syscall.SIGTERM, ""}, {syscall.SIGINT, ""}, {syscall.SIGQUIT, ""},
		{syscall.SIGTERM, "q"}, // the "unsaved changes" question open
		{syscall.SIGTERM, "W"}, // the save-as prompt open
		{syscall.SIGTERM, "o"}, // the optimizer running
	} {
		path := filepath.Join(t.TempDir(), "m.toml")
		os.WriteFile(path, data, 0o644)
		ok, stderr := signalTUI(t, path, tc.sig, tc.before)
		if !ok {
			t.Errorf("%v with %q open: no recovery (stderr %q)", tc.sig, tc.before, stderr)
		}
		if !strings.Contains(stderr, "unsaved changes written to") {
			t.Errorf("%v: stderr %q", tc.sig, stderr)
		}
	}
}

// The measure: SIGTERM to a UI with unsaved changes on 500
// compounds leaves a recovery file every time, in 20 tries (-short or
// under the race detector: 3).
func TestSigtermRecovery500Compounds(t *testing.T) {
	path := bigMethod(t, 500)
	tries := 20
	if testing.Short() || raceEnabled {
		tries = 3
	}
	got := 0
	for i := 0; i < tries; i++ {
		if ok, stderr := signalTUI(t, path, syscall.SIGTERM, ""); ok {
			got++
		} else {
			t.Logf("try %d: no recovery; stderr %q", i+1, stderr)
		}
	}
	t.Logf("SIGTERM at 500 compounds: %d/%d left a recovery file", got, tries)
	if got != tries {
		t.Errorf("%d/%d recovered", got, tries)
	}
}

// Keys from a file (rampwise tui m.toml < keys.txt) work: the UI starts,
// reads them, and q quits.
func TestTUIKeysFromFile(t *testing.T) {
	dir := t.TempDir()
	keys := filepath.Join(dir, "keys.txt")
	os.WriteFile(keys, []byte("q"), 0o644)
	f, err := os.Open(keys)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cmd := helper("tui", "--no-color", "../../testdata/demo.toml")
	cmd.Stdin = f
	var out, errb syncBuffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("exit %v; stderr %q", err, errb.String())
		}
	case <-time.After(20 * time.Second):
		cmd.Process.Kill()
		t.Fatalf("did not quit on q from a file; stderr %q", errb.String())
	}
	if !strings.Contains(out.String(), "program") {
		t.Errorf("UI not drawn: %q", out.String())
	}
}

// At the end of keys from a file or a pipe the UI exits instead of
// waiting: with unsaved changes non-zero, with the recovery file written
// and a message; a key typed after ctrl+s acts once the save is done.
func TestTUIEndOfInput(t *testing.T) {
	data, _ := os.ReadFile("../../testdata/demo.toml")
	for _, tc := range []struct {
		keys     string
		pipe     bool
		code     int
		recovery bool
		changed  bool
	}{
		{keys: "x", code: 1, recovery: true},
		{keys: "", code: 0},
		{keys: "", pipe: true, code: 0},
		{keys: "+\x13q", code: 0, changed: true},
		{keys: "+\x13q", pipe: true, code: 0, changed: true},
		{keys: "+\x13", code: 0, changed: true},
	} {
		dir := t.TempDir()
		path := filepath.Join(dir, "m.toml")
		os.WriteFile(path, data, 0o644)
		cmd := helper("tui", "--no-color", path)
		if tc.pipe {
			cmd.Stdin = strings.NewReader(tc.keys)
		} else {
			keys := filepath.Join(dir, "keys.txt")
			os.WriteFile(keys, []byte(tc.keys), 0o644)
			f, err := os.Open(keys)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			cmd.Stdin = f
		}
		var out, errb syncBuffer
		cmd.Stdout, cmd.Stderr = &out, &errb
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		select {
		case <-done:
		case <-time.After(20 * time.Second):
			cmd.Process.Kill()
			t.Fatalf("%q: still running at the end of input; stderr %q", tc.keys, errb.String())
		}
		if got := cmd.ProcessState.ExitCode(); got != tc.code {
			t.Errorf("%q (pipe %v): exit %d, want %d; stderr %q", tc.keys, tc.pipe, got, tc.code, errb.String())
		}
		_, err := os.Stat(path + ".rampwise-recovery.toml")
		if (err == nil) != tc.recovery {
			t.Errorf("%q: recovery file there %v, want %v", tc.keys, err == nil, tc.recovery)
		}
		if tc.recovery && !strings.Contains(errb.String(), "unsaved changes") {
			t.Errorf("%q: no message: %q", tc.keys, errb.String())
		}
		now, _ := os.ReadFile(path)
		if changed := string(now) != string(data); changed != tc.changed {
			t.Errorf("%q: file changed %v, want %v", tc.keys, changed, tc.changed)
		}
	}
}
