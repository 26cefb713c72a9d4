//go:build unix

package fsafe

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

func mkfifo(t *testing.T) string {
	p := filepath.Join(t.TempDir(), "pipe.toml")
	if err := syscall.Mkfifo(p, 0o644); err != nil {
		t.Skip("no FIFOs:", err)
	}
	return p
}

// within fails the test if f does not return in time (a hang on a FIFO).
func within(t *testing.T, d time.Duration, f func()) {
	t.Helper()
	done := make(chan struct{})
	go func() { f(); close(done) }()
	select {
	case <-done:
	case <-time.After(d):
		t.Fatal("blocked")
	}
}

func TestReadRegularRefusesFIFOWithoutHanging(t *testing.T) {
	p := mkfifo(t)
	within(t, 5*time.Second, func() {
		_, err := ReadRegular(p, 0)
		if !errors.Is(err, ErrNotRegular) || !strings.Contains(err.Error(), "FIFO") {
			t.Errorf("error %v", err)
		}
		if _, err := Take(p); err != nil {
			t.Errorf("fingerprint of a FIFO: %v", err)
		}
	})
}

func TestFIFOWrittenThrough(t *testing.T) {
	p := mkfifo(t)
	// No reader: an error at once, and the FIFO stays a FIFO.
	within(t, 5*time.Second, func() {
		err := WriteFile(p, []byte("x"))
		if err == nil || !strings.Contains(err.Error(), "no reader") {
			t.Errorf("error %v", err)
		}
	})
	// With a reader: the data goes down the pipe.
	got := make(chan string, 1)
	go func() {
		f, err := os.Open(p)
		if err != nil {
			got <- err.Error()
			return
		}
		defer f.Close()
		b := make([]byte, 100)
		n, _ := f.Read(b)
		got <- string(b[:n])
	}()
	var err error
	for i := 0; i < 200; i++ { // wait for the reader to open its end
		if err = WriteFile(p, []byte("through")); err == nil || !strings.Contains(err.Error(), "no reader") {
			break
		}
		time.Sleep(10 * time.Millisecond)
	}
	if err != nil {
		t.Fatal(err)
	}
	if s := <-got; s != "through" {
		t.Errorf("read %q", s)
	}
	st, _ := os.Lstat(p)
	if st.Mode()&os.ModeNamedPipe == 0 {
		t.Error("FIFO replaced")
	}
}

func TestDeviceWrittenThrough(t *testing.T) {
	if err := WriteFile("/dev/null", []byte("x")); err != nil {
		t.Fatal(err)
	}
	st, err := os.Stat("/dev/null")
	if err != nil || st.Mode()&os.ModeDevice == 0 {
		t.Fatal("/dev/null is no longer a device")
	}
}

// Run as root (an instrument PC's service account, a sudo edit), a save
// keeps the file's owner and group instead of giving it to root.
func TestOwnerKeptAsRoot(t *testing.T) {
	if os.Geteuid() != 0 {
		t.Skip("needs root")
	}
	p := filepath.Join(t.TempDir(), "m.toml")
	os.WriteFile(p, []byte("old"), 0o664)
	os.Chmod(p, 0o664)
	if err := os.Chown(p, 65534, 65534); err != nil {
		t.Skip(err)
	}
	if err := WriteFile(p, []byte("new")); err != nil {
		t.Fatal(err)
	}
	st, _ := os.Stat(p)
	s := st.Sys().(*syscall.Stat_t)
	if s.Uid != 65534 || s.Gid != 65534 || st.Mode().Perm() != 0o664 {
		t.Errorf("owner %d:%d mode %v", s.Uid, s.Gid, st.Mode().Perm())
	}
}
