package report

import (
	"bytes"
	"encoding/xml"
	"io"
	"testing"

	"github.com/rampwise/rampwise/model/methodfile"
)

// simOf simulates the method file at path.
func simOf(t *testing.T, path string) *Sim {
	t.Helper()
	m, err := methodfile.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return mustSimulate(t, m)
}

// simText simulates a method given as text.
func simText(t *testing.T, text string) *Sim {
	t.Helper()
	m, err := methodfile.Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	return mustSimulate(t, m)
}

func mustSimulate(t *testing.T, m *methodfile.Method) *Sim {
	t.Helper()
	s, err := Simulate(m)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// mustParseSVG fails the test unless data is well-formed XML.
func mustParseSVG(t *testing.T, data []byte) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	for {
		_, err := dec.Token()
		if err == io.EOF {
			return
		}
		if err != nil {
			t.Fatalf("SVG does not parse: %v", err)
		}
	}
}
