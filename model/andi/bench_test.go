package andi

import "testing"

func benchTrace() *Chromatogram {
	peaks := []Peak{{TimeMin: 2, Height: 500}, {TimeMin: 5, Height: 900}, {TimeMin: 5.1, Height: 700}, {TimeMin: 12, Height: 200}}
	return synth(peaks, []float64{0.01, 0.015, 0.015, 0.03}, 0.1, 20, 2, 1) // 12,000 samples
}

func BenchmarkFindPeaks(b *testing.B) {
	c := benchTrace()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		c.FindPeaks(FindOptions{})
	}
}

func BenchmarkDecodeChromatogram(b *testing.B) {
	data, err := EncodeChromatogram(benchTrace())
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.SetBytes(int64(len(data)))
	for i := 0; i < b.N; i++ {
		if _, err := DecodeChromatogram(data); err != nil {
			b.Fatal(err)
		}
	}
}
