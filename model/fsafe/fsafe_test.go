package fsafe

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
)

func read(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestReplaceKeepsModeAndLeavesNoTemp(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "m.toml")
	if err := os.WriteFile(p, []byte("old"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(p, []byte("new")); err != nil {
		t.Fatal(err)
	}
	if got := read(t, p); got != "new" {
		t.Fatalf("content %q", got)
	}
	st, _ := os.Stat(p)
	if runtime.GOOS != "windows" && st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want 0600", st.Mode().Perm())
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("left behind: %v", entries)
	}
}

func TestNewFile(t *testing.T) {
	p := filepath.Join(t.TempDir(), "new.toml")
	if err := WriteFile(p, []byte("x")); err != nil {
		t.Fatal(err)
	}
	if read(t, p) != "x" {
		t.Fatal("not written")
	}
}

type fullDisk struct {
	w    io.Writer
	left int
}

func (f *fullDisk) Write(p []byte) (int, error) {
	if len(p) > f.left {
		n, _ := f.w.Write(p[:f.left])
		return n, errors.New("no space left on device")
	}
	f.left -= len(p)
	return f.w.Write(p)
}

// A failed write names the user's path, never the temporary file, and
// leaves the old file and no temporary behind.
func TestFailedWriteNamesUserPath(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "m.toml")
	os.WriteFile(p, []byte("original content"), 0o644)
	WrapWriter = func(w io.Writer) io.Writer { return &fullDisk{w: w, left: 3} }
	defer func() { WrapWriter = func(w io.Writer) io.Writer { return w } }()
	err := WriteFile(p, []byte("a much longer new content"))
	if err == nil {
		t.Fatal("no error")
	}
	if !strings.Contains(err.Error(), p) || strings.Contains(err.Error(), ".tmp-") {
		t.Errorf("error %q", err)
	}
	if read(t, p) != "original content" {
		t.Error("original changed")
	}
	if e, _ := os.ReadDir(dir); len(e) != 1 {
		t.Errorf("left behind: %v", e)
	}
}

func TestMissingFolderNamesUserPath(t *testing.T) {
	p := filepath.Join(t.TempDir(), "no", "such", "m.toml")
	err := WriteFile(p, []byte("x"))
	if err == nil || !strings.Contains(err.Error(), p) || strings.Contains(err.Error(), ".tmp-") || !strings.Contains(err.Error(), "does not exist") {
		t.Fatalf("error %v", err)
	}
}

func TestSymlinkTargetUpdatedLinkKept(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("symlinks need privileges on Windows")
	}
	dir := t.TempDir()
	real := filepath.Join(dir, "store", "real.toml")
	os.MkdirAll(filepath.Dir(real), 0o755)
	os.WriteFile(real, []byte("old"), 0o640)
	link := filepath.Join(dir, "link.toml")
	if err := os.Symlink("store/real.toml", link); err != nil {
		t.Fatal(err)
	}
	link2 := filepath.Join(dir, "link2.toml")
	os.Symlink("link.toml", link2)
	if err := WriteFile(link2, []byte("new")); err != nil {
		t.Fatal(err)
	}
	for _, l := range []string{link, link2} {
		st, _ := os.Lstat(l)
		if st.Mode()&os.ModeSymlink == 0 {
			t.Errorf("%s is no longer a link", l)
		}
	}
	if read(t, real) != "new" {
		t.Error("target not updated")
	}
	st, _ := os.Stat(real)
	if st.Mode().Perm() != 0o640 {
		t.Errorf("mode %v", st.Mode().Perm())
	}
	// A dangling link creates its target.
	dang := filepath.Join(dir, "dang.toml")
	os.Symlink("store/later.toml", dang)
	if err := WriteFile(dang, []byte("fresh")); err != nil {
		t.Fatal(err)
	}
	if read(t, filepath.Join(dir, "store", "later.toml")) != "fresh" {
		t.Error("dangling link target not created")
	}
}

func TestHardLinkWrittenThroughWithBackup(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.toml")
	b := filepath.Join(dir, "b.toml")
	os.WriteFile(a, []byte("old content here"), 0o644)
	if err := os.Link(a, b); err != nil {
		t.Skip("no hard links here:", err)
	}
	if err := WriteFile(a, []byte("new")); err != nil {
		t.Fatal(err)
	}
	if read(t, a) != "new" || read(t, b) != "new" {
		t.Errorf("links differ: %q %q", read(t, a), read(t, b))
	}
	if read(t, a+".bak") != "old content here" {
		t.Errorf("bak %q", read(t, a+".bak"))
	}
}

func TestFolderRefused(t *testing.T) {
	dir := t.TempDir()
	if err := WriteFile(dir, []byte("x")); err == nil || !strings.Contains(err.Error(), "folder") {
		t.Fatalf("error %v", err)
	}
}

func TestFingerprint(t *testing.T) {
	p := filepath.Join(t.TempDir(), "m.toml")
	os.WriteFile(p, []byte("one"), 0o644)
	fp, err := Take(p)
	if err != nil || !fp.Exists || fp.Size != 3 {
		t.Fatalf("%+v %v", fp, err)
	}
	if ch, err := fp.Changed(p); ch || err != nil {
		t.Fatalf("unchanged file reported changed: %v", err)
	}
	// A touch alone is not a change.
	later := time.Now().Add(time.Hour)
	os.Chtimes(p, later, later)
	if ch, _ := fp.Changed(p); ch {
		t.Error("touch reported as a change")
	}
	// Same size, other bytes: a change.
	os.WriteFile(p, []byte("two"), 0o644)
	if ch, _ := fp.Changed(p); !ch {
		t.Error("rewrite not seen")
	}
	if fp2 := Of(p, []byte("two")); !fp2.SameContent(mustTake(t, p)) {
		t.Error("Of differs from Take")
	}
	os.Remove(p)
	if ch, _ := fp.Changed(p); !ch {
		t.Error("removal not seen")
	}
	none, _ := Take(p)
	if ch, _ := none.Changed(p); ch {
		t.Error("still missing reported changed")
	}
	os.WriteFile(p, []byte("x"), 0o644)
	if ch, _ := none.Changed(p); !ch {
		t.Error("appearance not seen")
	}
}

func mustTake(t *testing.T, p string) Fingerprint {
	fp, err := Take(p)
	if err != nil {
		t.Fatal(err)
	}
	return fp
}

func TestReadRegularLimit(t *testing.T) {
	p := filepath.Join(t.TempDir(), "m.toml")
	os.WriteFile(p, []byte("0123456789"), 0o644)
	if b, err := ReadRegular(p, 0); err != nil || string(b) != "0123456789" {
		t.Fatal(string(b), err)
	}
	if _, err := ReadRegular(p, 5); err == nil {
		t.Error("limit not applied")
	}
	if _, err := ReadRegular(filepath.Dir(p), 0); !errors.Is(err, ErrNotRegular) {
		t.Errorf("folder: %v", err)
	}
}

// A new file is 0644 (readable by the others who share the method folder).
func TestNewFileMode(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no Unix modes")
	}
	p := filepath.Join(t.TempDir(), "n.toml")
	if err := WriteFile(p, []byte("x")); err != nil {
		t.Fatal(err)
	}
	if st, _ := os.Stat(p); st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v", st.Mode().Perm())
	}
}

// A same-size rewrite that keeps the time (coarse file-system clocks, or
// a tool that restores it) is still seen.
func TestFingerprintSameSizeSameTime(t *testing.T) {
	p := filepath.Join(t.TempDir(), "m.toml")
	os.WriteFile(p, []byte("aaa"), 0o644)
	fp, _ := Take(p)
	os.WriteFile(p, []byte("bbb"), 0o644)
	os.Chtimes(p, fp.ModTime, fp.ModTime)
	if ch, _ := fp.Changed(p); !ch {
		t.Error("rewrite with the same size and time not seen")
	}
}

// The Windows replace retries while another program holds the file (a
// sharing violation), and gives up on other errors or when the budget is
// spent. The loop is the same on every platform, so it is tested here.
func TestRetryRename(t *testing.T) {
	busy := errors.New("sharing violation")
	transient := func(err error) bool { return err == busy }
	calls := 0
	flaky := func(from, to string) error {
		calls++
		if calls < 4 {
			return busy
		}
		return nil
	}
	if err := retryRename(flaky, transient, "a", "b", time.Second); err != nil || calls != 4 {
		t.Errorf("flaky: %v after %d calls", err, calls)
	}
	calls = 0
	denied := errors.New("denied")
	if err := retryRename(func(string, string) error { calls++; return denied }, transient, "a", "b", time.Second); err != denied || calls != 1 {
		t.Errorf("permanent error retried: %v after %d calls", err, calls)
	}
	start := time.Now()
	if err := retryRename(func(string, string) error { return busy }, transient, "a", "b", 50*time.Millisecond); err != busy {
		t.Errorf("held for good: %v", err)
	}
	if el := time.Since(start); el > 2*time.Second {
		t.Errorf("budget 50 ms took %v", el)
	}
}
