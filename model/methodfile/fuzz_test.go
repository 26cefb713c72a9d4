package methodfile

import (
	"os"
	"path/filepath"
	"testing"
)

func addFiles(f *testing.F, patterns ...string) {
	for _, p := range patterns {
		files, _ := filepath.Glob(p)
		for _, file := range files {
			if data, err := os.ReadFile(file); err == nil {
				f.Add(data)
			}
		}
	}
}

// FuzzParse: the method decoder never panics, and whatever it accepts
// writes and reads back to the same method.
func FuzzParse(f *testing.F) {
	addFiles(f, "../../testdata/*.toml", "../../testdata/bad/*.toml")
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := Parse("fuzz.toml", data)
		if err != nil {
			if _, ok := err.(*Error); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		out, err := Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		back, err := Parse("again.toml", out)
		if err != nil {
			t.Fatalf("accepted method does not read back: %v\n%s", err, out)
		}
		if !m.Equal(back) {
			t.Fatalf("round trip differs")
		}
		if _, err := m.System(); err != nil {
			// a valid file may still describe impossible physics; that is
			// an error, never a panic
			return
		}
	})
}

// FuzzParseRuns: the scouting-runs decoder never panics.
func FuzzParseRuns(f *testing.F) {
	addFiles(f, "../../testdata/scouting.toml", "../../testdata/bad-runs/*.toml")
	m, err := ReadFile("../../testdata/demo.toml")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		runs, err := ParseRuns("runs.toml", data, m)
		if err != nil {
			if _, ok := err.(*Error); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		for i := range runs.Runs {
			if err := m.RunMethod(&runs.Runs[i]).ModelProgram().Validate(m.ModelColumn().MaxTemp); err != nil {
				t.Fatalf("accepted run with an invalid program: %v", err)
			}
		}
	})
}
