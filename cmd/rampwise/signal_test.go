package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/rampwise/rampwise/model/methodfile"
)

// TestHelperProcess runs rampwise in a child process for the tests below.
func TestHelperProcess(t *testing.T) {
	if os.Getenv("RAMPWISE_HELPER") != "1" {
		t.Skip("helper for other tests")
	}
	os.Exit(run(strings.Split(os.Getenv("RAMPWISE_ARGS"), "\x1f"), os.Stdout, os.Stderr))
}

type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

func helper(args ...string) *exec.Cmd {
	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperProcess$")
	cmd.Env = append(os.Environ(), "RAMPWISE_HELPER=1", "RAMPWISE_ARGS="+strings.Join(args, "\x1f"))
	return cmd
}

func waitOutput(t *testing.T, b *syncBuffer, text string) {
	t.Helper()
	deadline := time.Now().Add(20 * time.Second)
	for !strings.Contains(b.String(), text) {
		if time.Now().After(deadline) {
			t.Fatalf("no %q in output:\n%s", text, b.String())
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// SIGHUP with unsaved changes writes the recovery file beside the method.
func TestSighupWritesRecovery(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.toml")
	data, _ := os.ReadFile("../../testdata/demo.toml")
	os.WriteFile(path, data, 0o644)
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
	cmd.Process.Signal(syscall.SIGHUP)
	cmd.Wait()
	rp := filepath.Join(dir, "m.toml.rampwise-recovery.toml")
	m, err := methodfile.ReadFile(rp)
	if err != nil {
		t.Fatalf("recovery file: %v (stderr %s)", err, errb.String())
	}
	if m.Oven.InitialC != 60 {
		t.Errorf("recovered start temperature %v, want 60", m.Oven.InitialC)
	}
	if !strings.Contains(errb.String(), "unsaved changes written") {
		t.Errorf("stderr: %q", errb.String())
	}
	orig, _ := os.ReadFile(path)
	if !bytes.Equal(orig, data) {
		t.Error("the original method was changed")
	}
}

// Killing a process (kill -9) during repeated saves never leaves a
// truncated method: every read between kills parses.
func TestKillDuringSavesNeverTruncates(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.toml")
	data, _ := os.ReadFile("../../testdata/demo.toml")
	os.WriteFile(path, data, 0o644)
	for i := 0; i < 5; i++ {
		cmd := helper("optimize", "--out", path, path)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(time.Duration(20+15*i) * time.Millisecond)
		cmd.Process.Kill()
		cmd.Wait()
		if _, err := methodfile.ReadFile(path); err != nil {
			t.Fatalf("after kill %d: %v", i, err)
		}
	}
	leftovers, _ := filepath.Glob(filepath.Join(dir, "*"))
	for _, f := range leftovers {
		if f != path && !strings.Contains(f, ".m.toml") {
			t.Errorf("unexpected file %s", f)
		}
	}
}
