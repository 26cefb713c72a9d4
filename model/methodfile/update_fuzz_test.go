package methodfile

import (
	"bytes"
	"testing"
)

// FuzzUpdate: for any file the decoder accepts and an edit chosen by the
// fuzzer (a value, a ramp or a compound added or removed), Update never
// panics and its result always means the edited method (placed in the
// text, or written fresh when the layout defeats the placer).
func FuzzUpdate(f *testing.F) {
	addFiles(f, "../../testdata/*.toml")
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := Parse("fuzz.toml", data)
		if err != nil {
			return
		}
		e := m.Clone()
		sel := 0
		if len(data) > 0 {
			sel = int(data[len(data)/2])
		}
		switch sel % 5 {
		case 0:
			e.Oven.InitialC = e.Limits.OvenMinC
		case 1:
			e.Title = "edited"
		case 2:
			if len(e.Compounds) > 1 {
				e.Compounds = e.Compounds[1:]
			}
		case 3:
			if len(e.Oven.Ramps) > 1 {
				e.Oven.Ramps = e.Oven.Ramps[:len(e.Oven.Ramps)-1]
			}
		case 4:
			e.Compounds[len(e.Compounds)-1].Amount = 2.5
		}
		want, err := Marshal(e)
		if err != nil {
			return
		}
		if _, err := Parse("edited.toml", want); err != nil {
			return // the edit made an invalid method
		}
		out, _, err := Update("fuzz.toml", data, e)
		if err != nil {
			t.Fatal(err)
		}
		got, err := Parse("out.toml", out)
		if err != nil {
			t.Fatalf("result does not parse: %v\n%s", err, out)
		}
		if again, _ := Marshal(got); !bytes.Equal(again, want) {
			t.Fatalf("result means another method:\n%s", out)
		}
	})
}
