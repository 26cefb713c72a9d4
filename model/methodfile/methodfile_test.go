package methodfile

import (
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/rampwise/rampwise/model"
	"github.com/rampwise/rampwise/model/fsafe"
)

const demoPath = "../../testdata/demo.toml"

func readDemo(t *testing.T) *Method {
	t.Helper()
	m, err := ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func TestDemoLoads(t *testing.T) {
	m := readDemo(t)
	if len(m.Compounds) < 12 || len(m.Compounds) > 20 {
		t.Errorf("demo has %d compounds", len(m.Compounds))
	}
	if _, err := m.System(); err != nil {
		t.Fatal(err)
	}
}

// The copy embedded in the binary must be the demo in testdata/.
func TestEmbeddedDemoIsTestdata(t *testing.T) {
	a, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile("../../cmd/rampwise/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	if string(a) != string(b) {
		t.Error("cmd/rampwise/demo.toml differs from testdata/demo.toml: copy testdata/demo.toml over it")
	}
}

func TestRoundTrip(t *testing.T) {
	for _, path := range []string{demoPath, "../../testdata/bench20.toml", "../../testdata/index.toml"} {
		m, err := ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		data, err := Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		m2, err := Parse("again", data)
		if err != nil {
			t.Fatalf("%s: re-read: %v\n%s", path, err, data)
		}
		if !m.Equal(m2) {
			t.Errorf("%s: round trip differs:\n%+v\n%+v", path, m, m2)
		}
	}
}

func TestSaveAtomicAndReadBack(t *testing.T) {
	m := readDemo(t)
	dir := t.TempDir()
	path := filepath.Join(dir, "m.toml")
	m.Oven.Ramps[0].RateCMin = 7.5
	if err := WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	back, err := ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !m.Equal(back) {
		t.Error("saved method reads back different")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("temporary files left: %v", entries)
	}
}

// A save into a folder that cannot be written fails with a clear error and
// leaves the existing file as it was.
func TestSaveFailureKeepsOriginal(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Log("running as root: a read-only folder is still writable; checking the invalid-method path only")
	}
	m := readDemo(t)
	dir := t.TempDir()
	path := filepath.Join(dir, "m.toml")
	if err := WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	orig, _ := os.ReadFile(path)
	broken := m.Clone()
	broken.Oven.Ramps[0].FinalC = broken.Column.MaxTempC + 50
	if err := WriteFile(path, broken); err == nil {
		t.Error("a program above the column maximum was saved")
	}
	if os.Geteuid() != 0 {
		os.Chmod(dir, 0o500)
		defer os.Chmod(dir, 0o700)
		if err := WriteFile(path, m); err == nil {
			t.Error("save into a read-only folder reported success")
		}
	}
	now, _ := os.ReadFile(path)
	if string(now) != string(orig) {
		t.Error("original file changed by a failed save")
	}
}

func TestErrorsNameFileLineKey(t *testing.T) {
	base, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, from, to string
		line           int
		want           string
	}{
		{"unknown key", "film_um = 0.25\n", "film_um = 0.25\ncolour = 3\n", 10, "colour"},
		{"wrong type", "length_m = 30.0", `length_m = "thirty"`, 7, "length_m"},
		{"film too thick", "diameter_mm = 0.25\nfilm_um = 0.25", "diameter_mm = 0.05\nfilm_um = 30", 9, "thicker than the column radius"},
		{"rate zero", "rate_c_min = 12.0", "rate_c_min = 0.0", 24, "rate_c_min"},
		{"above max", "final_c = 240.0", "final_c = 400.0", 25, "above the column maximum"},
		{"unknown gas", `gas = "helium"`, `gas = "argon"`, 14, "not one of"},
		{"nan", "length_m = 30.0", "length_m = nan", 7, "finite"},
		{"inf", "length_m = 30.0", "length_m = inf", 7, "finite"},
		{"bad formula", `formula = "C4H8O2"`, `formula = "C4H8Xq2"`, 0, "unknown element"},
		{"duplicate", `name = "hexanal"`, `name = "ethanol"`, 0, "duplicate"},
		{"syntax", "[column]\n", "[column\n", 6, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := strings.Replace(string(base), c.from, c.to, 1)
			if text == string(base) {
				t.Fatalf("fixture did not change")
			}
			_, err := Parse("m.toml", []byte(text))
			var fe *Error
			if !errors.As(err, &fe) {
				t.Fatalf("error %v is not a file error", err)
			}
			if fe.File != "m.toml" || fe.Line == 0 || (c.line > 0 && fe.Line != c.line) {
				t.Errorf("error %q: line %d, want %d", err, fe.Line, c.line)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q lacks %q", err, c.want)
			}
		})
	}
	if _, err := Parse("m.toml", []byte("[column]\nlength_m = 30.0\n")); err == nil || !strings.Contains(err.Error(), "diameter_mm") {
		t.Errorf("missing key: %v", err)
	}
	if _, err := Parse("m.toml", []byte("title = \"x\"\n")); err == nil || !strings.Contains(err.Error(), "[column]") {
		t.Errorf("missing table: %v", err)
	}
}

// Every compound given only by retention index reproduces its index within
// 0.1 unit (the Kováts definition, Kováts 1958, with the ladder's own
// retention factors) at its index_temp_c and, the index being taken as
// independent of temperature, at 60, 120 and 200 °C; also against a ladder
// with a gap (C11 removed), where the bracketing pair is C10 and C12.
func TestIndexOnlyCompound(t *testing.T) {
	full, err := ReadFile("../../testdata/index.toml")
	if err != nil {
		t.Fatal(err)
	}
	gapped := full.Clone()
	var keep []Compound
	for _, c := range gapped.Compounds {
		if c.AlkaneCarbons != 11 {
			keep = append(keep, c)
		}
	}
	gapped.Compounds = keep
	for i := range gapped.Compounds {
		if gapped.Compounds[i].FromIndex {
			if err := fromIndex(gapped, i); err != nil {
				t.Fatal(err)
			}
		}
	}
	for _, m := range []*Method{full, gapped} {
		sys, err := m.System()
		if err != nil {
			t.Fatal(err)
		}
		found := 0
		for i, c := range m.Compounds {
			if !c.FromIndex {
				continue
			}
			found++
			temps := []float64{60, 120, 200}
			if c.HasIndexTemp {
				temps = append(temps, c.IndexTempC)
			}
			for _, tc := range temps {
				temp := tc + model.ZeroCelsius
				var lad []model.LadderPoint
				for j, a := range m.Compounds {
					if a.AlkaneCarbons > 0 {
						lad = append(lad, model.LadderPoint{Carbons: a.AlkaneCarbons, Retention: sys.Cond.RetentionFactor(&sys.Compounds[j], temp)})
					}
				}
				idx, err := model.IndexFromLadder(sys.Cond.RetentionFactor(&sys.Compounds[i], temp), lad, true)
				if err != nil {
					t.Fatal(err)
				}
				if math.Abs(idx-c.RetentionIndex) > 0.1 {
					t.Errorf("%s (%d ladder alkanes): Kováts index %.3f at %v °C, given %v", c.Name, len(lad), idx, tc, c.RetentionIndex)
				}
			}
		}
		if found != 3 {
			t.Fatalf("fixture has %d index-only compounds, want 3", found)
		}
	}
}

type fullDisk struct {
	w    io.Writer
	left int
}

func (f *fullDisk) Write(p []byte) (int, error) {
	if len(p) > f.left {
		n, _ := f.w.Write(p[:f.left])
		f.left = 0
		return n, errors.New("no space left on device")
	}
	f.left -= len(p)
	return f.w.Write(p)
}

// A save that fails half-way (a full disk) reports it and leaves the
// original file exactly as it was, with no temporary file behind.
func TestSaveFullDiskKeepsOriginal(t *testing.T) {
	m := readDemo(t)
	dir := t.TempDir()
	path := filepath.Join(dir, "m.toml")
	if err := WriteFile(path, m); err != nil {
		t.Fatal(err)
	}
	orig, _ := os.ReadFile(path)
	fsafe.WrapWriter = func(w io.Writer) io.Writer { return &fullDisk{w: w, left: 200} }
	defer func() { fsafe.WrapWriter = func(w io.Writer) io.Writer { return w } }()
	changed := m.Clone()
	changed.Oven.InitialC = 45
	err := WriteFile(path, changed)
	if err == nil || !strings.Contains(err.Error(), "no space left") || !strings.Contains(err.Error(), path) {
		t.Fatalf("error %v", err)
	}
	now, _ := os.ReadFile(path)
	if string(now) != string(orig) {
		t.Error("original changed by a failed save")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("temporary file left: %v", entries)
	}
}
