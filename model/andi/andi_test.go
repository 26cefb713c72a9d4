package andi

import (
	"bytes"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// A file built by hand, byte by byte, from the Unidata netCDF classic format
// specification's grammar: magic "CDF\x01", numrecs, dim_list, gatt_list,
// var_list (name, nelems, dimids, vatt_list, nc_type, vsize, begin), then
// the data of the one non-record variable.
func TestDecodeHandBuilt(t *testing.T) {
	var b []byte
	u := func(x uint32) { b = binary.BigEndian.AppendUint32(b, x) }
	b = append(b, "CDF\x01"...)
	u(0)                        // numrecs
	u(0x0A)                     // NC_DIMENSION
	u(1)                        // one dim
	u(1)                        // name length
	b = append(b, 'x', 0, 0, 0) // padded name
	u(3)                        // dim length
	u(0x0C)                     // NC_ATTRIBUTE
	u(1)
	u(5)
	b = append(b, "title\x00\x00\x00"...)
	u(2) // NC_CHAR
	u(2)
	b = append(b, "ok\x00\x00"...)
	u(0x0B) // NC_VARIABLE
	u(1)
	u(1)
	b = append(b, 'v', 0, 0, 0)
	u(1) // one dim
	u(0) // dim id 0
	u(0) // ABSENT vatt_list
	u(0)
	u(3) // NC_SHORT
	u(8) // vsize: 3 shorts padded to 8
	begin := len(b) + 4
	u(uint32(begin))
	b = binary.BigEndian.AppendUint16(b, 1)
	b = binary.BigEndian.AppendUint16(b, 0xFFFF)
	b = binary.BigEndian.AppendUint16(b, 300)
	b = append(b, 0, 0)
	f, err := Decode(b)
	if err != nil {
		t.Fatal(err)
	}
	if f.Version != 1 || len(f.Dims) != 1 || f.Dims[0] != (Dim{"x", 3}) {
		t.Fatalf("dims %+v", f.Dims)
	}
	if f.Attr("title").Value != "ok" {
		t.Fatalf("attr %+v", f.Attrs)
	}
	if got := f.Var("v").Value.([]int16); !reflect.DeepEqual(got, []int16{1, -1, 300}) {
		t.Fatalf("values %v", got)
	}
	// and our writer produces the same bytes for the same content
	out, err := Encode(f)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(out, b) {
		t.Fatalf("writer differs from the hand-built file:\n%x\n%x", out, b)
	}
}

func TestRoundTripBothVersions(t *testing.T) {
	for _, ver := range []int{1, 2} {
		f := &File{Version: ver, NumRecs: 3,
			Dims:  []Dim{{"time", 0}, {"n", 2}, {"s", 5}},
			Attrs: []Attr{{"a", TypeDouble, []float64{1.5, -2}}, {"b", TypeInt, []int32{7}}},
			Vars: []Var{
				{Name: "fixed", Dims: []int{1}, Type: TypeDouble, Value: []float64{math.Pi, math.E}},
				{Name: "txt", Dims: []int{2}, Type: TypeChar, Value: "abc\x00\x00"},
				{Name: "r1", Dims: []int{0, 1}, Type: TypeFloat, Value: []float32{1, 2, 3, 4, 5, 6}},
				{Name: "r2", Dims: []int{0}, Type: TypeByte, Value: []int8{-1, 0, 1}},
				{Name: "sc", Type: TypeShort, Value: []int16{42}},
			}}
		b, err := Encode(f)
		if err != nil {
			t.Fatal(err)
		}
		if b[3] != byte(ver) {
			t.Fatalf("version byte %d", b[3])
		}
		g, err := Decode(b)
		if err != nil {
			t.Fatal(ver, err)
		}
		for i := range f.Vars {
			if !reflect.DeepEqual(f.Vars[i].Value, g.Vars[i].Value) {
				t.Errorf("v%d %s: %v != %v", ver, f.Vars[i].Name, g.Vars[i].Value, f.Vars[i].Value)
			}
		}
		if g.NumRecs != 3 || g.Dims[0].Len != 3 {
			t.Errorf("records %d", g.NumRecs)
		}
	}
}

func TestSingleRecordVariableUnpadded(t *testing.T) {
	// the spec's exception: one record variable of a small type is not padded per record
	f := &File{Version: 1, NumRecs: 3, Dims: []Dim{{"r", 0}},
		Vars: []Var{{Name: "c", Dims: []int{0}, Type: TypeShort, Value: []int16{1, 2, 3}}}}
	b, err := Encode(f)
	if err != nil {
		t.Fatal(err)
	}
	g, err := Decode(b)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(g.Vars[0].Value, []int16{1, 2, 3}) {
		t.Fatal(g.Vars[0].Value)
	}
	if got := len(b); got%2 != 0 || bytes.HasSuffix(b, []byte{0, 1, 0, 0, 0, 2}) {
		t.Fatalf("record data padded: % x", b[len(b)-8:])
	}
}

func TestRejects(t *testing.T) {
	for name, b := range map[string][]byte{
		"empty":     {},
		"not cdf":   []byte("hello world"),
		"hdf5":      []byte("\x89HDF\r\n\x1a\n"),
		"cdf5":      []byte("CDF\x05\x00\x00\x00\x00"),
		"truncated": []byte("CDF\x01\x00\x00\x00\x00\x00\x00\x00\x0A\x00\x00\x00\x01"),
	} {
		if _, err := Decode(b); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	// ANDI without ordinate_values
	b, _ := Encode(&File{Version: 1})
	if _, err := DecodeChromatogram(b); err == nil {
		t.Error("a file without ordinate_values was accepted as a chromatogram")
	}
}

// synthetic trace: Gaussians on a drifting baseline with white noise
func synth(peaks []Peak, sigmaMin []float64, dt, tEnd, noise float64, seed uint64) *Chromatogram {
	r := rand.New(rand.NewPCG(seed, 1))
	n := int(tEnd * 60 / dt)
	c := &Chromatogram{DelayS: 0, IntervalS: dt, Values: make([]float64, n)}
	for i := range c.Values {
		tm := c.Time(i)
		y := 50 + 3*tm + noise*r.NormFloat64()
		for k, p := range peaks {
			z := (tm - p.TimeMin) / sigmaMin[k]
			y += p.Height * math.Exp(-z*z/2)
		}
		c.Values[i] = y
	}
	return c
}

func TestFindPeaksOnWrittenFile(t *testing.T) {
	truth := []Peak{{TimeMin: 2.1, Height: 400}, {TimeMin: 3.5, Height: 1000}, {TimeMin: 3.62, Height: 800}, {TimeMin: 7.0, Height: 150}}
	sig := []float64{0.01, 0.015, 0.015, 0.03}
	c := synth(truth, sig, 0.1, 10, 2, 7)
	b, err := EncodeChromatogram(c)
	if err != nil {
		t.Fatal(err)
	}
	c2, err := DecodeChromatogram(b)
	if err != nil {
		t.Fatal(err)
	}
	if c2.Peaks != nil {
		t.Fatal("peak table appeared from nowhere")
	}
	got := c2.FindPeaks(FindOptions{})
	if len(got) != len(truth) {
		t.Fatalf("found %d peaks, want %d: %+v", len(got), len(truth), got)
	}
	for i, p := range got {
		if d := math.Abs(p.TimeMin - truth[i].TimeMin); d > 0.002 {
			t.Errorf("peak %d at %.4f, want %.4f", i, p.TimeMin, truth[i].TimeMin)
		}
		if i == 0 || i == 3 { // isolated: width and area to a few %
			w := 2.3548200450309493 * sig[i]
			if math.Abs(p.WidthMin/w-1) > 0.05 {
				t.Errorf("peak %d width %.4f, want %.4f", i, p.WidthMin, w)
			}
			a := truth[i].Height * sig[i] * 60 * math.Sqrt(2*math.Pi)
			if math.Abs(p.Area/a-1) > 0.05 {
				t.Errorf("peak %d area %.1f, want %.1f", i, p.Area, a)
			}
		}
	}
}

func TestChromatogramPeakTableRoundTrip(t *testing.T) {
	c := &Chromatogram{IntervalS: 0.2, DelayS: 6, Values: []float64{1, 2, 3, 2, 1}, Title: "scout",
		Peaks: []Peak{{Name: "toluene", TimeMin: 7.4213, Area: 1234, Height: 99, WidthMin: 0.041}, {TimeMin: 8.5}}}
	b, err := EncodeChromatogram(c)
	if err != nil {
		t.Fatal(err)
	}
	g, err := DecodeChromatogram(b)
	if err != nil {
		t.Fatal(err)
	}
	if len(g.Peaks) != 2 || g.Peaks[0].Name != "toluene" || g.Peaks[1].Name != "" || g.Title != "scout" {
		t.Fatalf("%+v", g)
	}
	if math.Abs(g.Peaks[0].TimeMin-7.4213) > 1e-5 || math.Abs(g.Peaks[0].WidthMin-0.041) > 1e-6 {
		t.Fatalf("%+v", g.Peaks[0])
	}
	if math.Abs(g.Time(1)-(6.2/60)) > 1e-7 {
		t.Fatal(g.Time(1))
	}
}
