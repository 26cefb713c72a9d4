package report

import (
	"bytes"
	"math"
	"testing"

	"github.com/rampwise/rampwise/model/calibrate"
	"github.com/rampwise/rampwise/model/methodfile"
)

func TestMeasuredOverlay(t *testing.T) {
	s := demoSim(t)
	run, err := methodfile.ReadExportRun("../../testdata/lab/verify.csv", s.Method, nil)
	if err != nil {
		t.Fatal(err)
	}
	ck, err := calibrate.Verify(s.Method, run)
	if err != nil {
		t.Fatal(err)
	}
	m := MeasuredFromCheck(ck)
	if len(m.Matches) != len(s.Method.Compounds) {
		t.Fatalf("%d matches for %d compounds", len(m.Matches), len(s.Method.Compounds))
	}
	for _, x := range m.Matches {
		if math.Abs(x.MeasuredMin-x.PredictedMin) > 0.02 {
			t.Errorf("%s joined across %.3f min", x.Compound, x.MeasuredMin-x.PredictedMin)
		}
	}
	// the rebuilt signal peaks at each measured apex
	for _, p := range m.Peaks {
		if y, y2 := m.signal(p.TimeMin), m.signal(p.TimeMin+3*p.WidthMin); !(y > y2) {
			t.Errorf("no peak at %.3f", p.TimeMin)
		}
	}
	s.Measured = m
	svg, err := s.Figure("svg", 800, 500)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(svg, []byte("measured verify.csv (below)")) {
		t.Error("figure lacks the measured run's legend")
	}
	plain, _ := demoSim(t).Figure("svg", 800, 500)
	if len(svg) <= len(plain) {
		t.Error("the overlay drew nothing")
	}
	if _, err := s.Figure("png", 600, 400); err != nil {
		t.Error(err)
	}
}
