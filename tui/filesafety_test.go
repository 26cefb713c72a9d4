package tui

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"github.com/rampwise/rampwise/model/methodfile"
)

// With the file changed on disk after it was loaded, a save does not
// silently discard that change: it asks, and each answer does what it says.
func TestSaveAsksWhenFileChangedOnDisk(t *testing.T) {
	a, path := newApp(t, 100, 30)
	press(a, "]") // an edit here
	// Someone else saves the file with another change.
	other, _ := methodfile.ReadFile(path)
	other.Title = "changed elsewhere"
	if err := methodfile.WriteFile(path, other); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(path)
	press(a, "ctrl+s")
	if _, ok := a.overlay.(*confirmDialog); !ok || !strings.Contains(a.message, "changed on disk") {
		t.Fatalf("no question: %q", a.message)
	}
	if now, _ := os.ReadFile(path); string(now) != string(before) {
		t.Fatal("saved without asking")
	}
	press(a, "esc")
	if now, _ := os.ReadFile(path); string(now) != string(before) || !a.Dirty() || a.overlay != nil {
		t.Fatal("esc saved or dropped the edits")
	}
	// r reloads (and u brings the edits back).
	edited := a.Method()
	press(a, "ctrl+s", "r")
	if a.Method().Title != "changed elsewhere" || a.Dirty() {
		t.Fatalf("reload: title %q dirty %v", a.Method().Title, a.Dirty())
	}
	press(a, "u")
	if a.Method() != edited {
		t.Error("u did not bring the edits back after a reload")
	}
	// Changed again on disk; o overwrites, and a later save is quiet.
	other.Title = "changed elsewhere again"
	methodfile.WriteFile(path, other)
	press(a, "ctrl+s", "o")
	got, err := methodfile.ReadFile(path)
	if err != nil || got.Oven.InitialC != edited.Oven.InitialC {
		t.Fatalf("overwrite: %v %v", err, got)
	}
	press(a, "]", "ctrl+s")
	if a.overlay != nil || a.Dirty() {
		t.Errorf("a save after our own save asked again: %q", a.message)
	}
	// w offers save as.
	methodfile.WriteFile(path, other)
	press(a, "]", "ctrl+s", "w")
	if _, ok := a.overlay.(*promptDialog); !ok {
		t.Errorf("w did not open save-as: %T %q", a.overlay, a.message)
	}
}

// A touch (time changed, content not) is not a change worth asking about.
func TestSaveAfterTouchDoesNotAsk(t *testing.T) {
	a, path := newApp(t, 100, 30)
	press(a, "]")
	later := time.Now().Add(time.Minute)
	os.Chtimes(path, later, later)
	press(a, "ctrl+s")
	if a.overlay != nil || a.Dirty() {
		t.Errorf("asked after a touch: %q", a.message)
	}
}

// blend.toml and blend.method get different recovery files.
func TestRecoveryNamesDiffer(t *testing.T) {
	if RecoveryPath("blend.toml") == RecoveryPath("blend.method") {
		t.Fatal("one recovery name for two files")
	}
	if RecoveryPath(filepath.Join("x", "blend.toml")) != filepath.Join("x", "blend.toml.rampwise-recovery.toml") {
		t.Error(RecoveryPath("x/blend.toml"))
	}
}

// A corrupt recovery file is reported and kept aside, not ignored and not
// offered again.
func TestCorruptRecoveryKeptAside(t *testing.T) {
	a, path := newApp(t, 80, 24)
	_ = a
	rp := RecoveryPath(path)
	os.WriteFile(rp, []byte("[column\nbroken"), 0o644)
	m, _ := methodfile.ReadFile(path)
	b, err := New(m, Options{Path: path, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	send(b, tea.WindowSizeMsg{Width: 200, Height: 24})
	if !strings.Contains(b.message, "could not be read") || !strings.Contains(b.message, "kept it aside") {
		t.Errorf("message %q", b.message)
	}
	if _, err := os.Stat(rp); err == nil {
		t.Error("corrupt file still where it would be offered again")
	}
	aside, _ := filepath.Glob(rp + ".corrupt-*")
	if len(aside) != 1 {
		t.Fatalf("kept aside: %v", aside)
	}
	if data, _ := os.ReadFile(aside[0]); string(data) != "[column\nbroken" {
		t.Error("corrupt file not kept as it was")
	}
}

// The offer says how old the recovery is and how old the file is.
func TestRecoveryOfferShowsAge(t *testing.T) {
	r := &Recovery{Path: "m.toml" + RecoverySuffix, Written: time.Unix(1000, 0), FileTime: time.Unix(1000+7200, 0)}
	s := r.Offer(time.Unix(1000+3*3600, 0))
	if !strings.Contains(s, "written 3 h ago") || !strings.Contains(s, "file saved 1 h ago, later") {
		t.Error(s)
	}
}

// When the method's folder cannot be written, the recovery goes to the
// user's cache folder, and the next start finds it there.
func TestRecoveryFallsBackToCache(t *testing.T) {
	cache := t.TempDir()
	t.Setenv("XDG_CACHE_HOME", cache)
	t.Setenv("HOME", cache)
	t.Setenv("LocalAppData", cache)
	dir := t.TempDir()
	path := filepath.Join(dir, "m.toml")
	m := demoMethod(t)
	methodfile.WriteFile(path, m)
	// Make the recovery path unwritable: a folder stands where the file
	// would go (works even for root, unlike a read-only folder).
	os.Mkdir(RecoveryPath(path), 0o755)
	g := NewGuard(path)
	changed := m.Clone()
	changed.Oven.InitialC = 61
	g.update(path, changed, true)
	rp, err := g.WriteRecovery()
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(rp, cache) {
		t.Fatalf("recovery at %s, not in the cache %s", rp, cache)
	}
	os.Remove(RecoveryPath(path))
	r := FindRecovery(path)
	if r == nil || r.Method == nil || r.Method.Oven.InitialC != 61 || r.Path != rp {
		t.Fatalf("not found again: %+v", r)
	}
	g.Saved(path, changed)
	if _, err := os.Stat(rp); err == nil {
		t.Error("cache recovery left after a save")
	}
}

// A save from the UI keeps the file's comments and layout: one edit, a
// one-line diff.
func TestUISaveKeepsComments(t *testing.T) {
	orig, err := os.ReadFile("../testdata/commented.toml")
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "commented.toml")
	os.WriteFile(path, orig, 0o644)
	m, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	a, err := New(m, Options{Path: path, NoColor: true})
	if err != nil {
		t.Fatal(err)
	}
	send(a, tea.WindowSizeMsg{Width: 100, Height: 30})
	press(a, "]", "ctrl+s") // start temperature +10 °C, save
	if a.Dirty() {
		t.Fatalf("not saved: %q", a.message)
	}
	now, _ := os.ReadFile(path)
	ol, nl := strings.Split(string(orig), "\n"), strings.Split(string(now), "\n")
	if len(ol) != len(nl) {
		t.Fatalf("%d lines became %d:\n%s", len(ol), len(nl), now)
	}
	var diff []string
	for i := range ol {
		if ol[i] != nl[i] {
			diff = append(diff, ol[i]+" → "+nl[i])
		}
	}
	if len(diff) != 1 || diff[0] != "initial_c = 50          # start → initial_c = 60          # start" {
		t.Errorf("diff %q", diff)
	}
}

// The signal path's work: writing the recovery file of a 2000-compound
// method (Marshal and an atomic write, no validation).
func BenchmarkWriteRecovery2000(b *testing.B) {
	m := demoMethod(b)
	base := m.Compounds
	m.Compounds = nil
	for i := 0; i < 2000; i++ {
		c := base[i%len(base)]
		c.Name = fmt.Sprintf("%s %d", c.Name, i)
		m.Compounds = append(m.Compounds, c)
	}
	path := filepath.Join(b.TempDir(), "big.toml")
	g := NewGuard(path)
	g.update(path, m, true)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := g.WriteRecovery(); err != nil {
			b.Fatal(err)
		}
	}
}
