package andi

import "testing"

// FuzzDecode: no input makes the netCDF or ANDI reader panic or hang, and a
// file the reader accepts encodes and decodes to the same values.
func FuzzDecode(f *testing.F) {
	c := &Chromatogram{IntervalS: 0.5, Values: []float64{1, 5, 2}, Peaks: []Peak{{Name: "a", TimeMin: 1}}}
	b, _ := EncodeChromatogram(c)
	f.Add(b)
	b2, _ := Encode(&File{Version: 2, NumRecs: 2, Dims: []Dim{{"r", 0}, {"n", 1}},
		Vars: []Var{{Name: "x", Dims: []int{0, 1}, Type: TypeDouble, Value: []float64{1, 2}}, {Name: "y", Dims: []int{0}, Type: TypeChar, Value: "ab"}}})
	f.Add(b2)
	f.Add([]byte("CDF\x01\xff\xff\xff\xff"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if ch, err := DecodeChromatogram(data); err == nil {
			ch.FindPeaks(FindOptions{})
		}
		g, err := Decode(data)
		if err != nil {
			return
		}
		out, err := Encode(g)
		if err != nil {
			return // e.g. a streaming record count the writer does not reproduce
		}
		h, err := Decode(out)
		if err != nil {
			t.Fatalf("re-encoded file does not decode: %v", err)
		}
		if len(h.Vars) != len(g.Vars) {
			t.Fatalf("variables %d != %d", len(h.Vars), len(g.Vars))
		}
	})
}
