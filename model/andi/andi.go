package andi

import (
	"errors"
	"fmt"
	"io/fs"
	"math"
	"strings"

	"github.com/rampwise/rampwise/model/fsafe"
)

// MaxFileSize caps what Read accepts.
const MaxFileSize = 256 << 20

// Peak is one entry of a file's peak table, or one found in the trace.
// Times and widths in minutes; WidthMin is the width at half height.
type Peak struct {
	Name     string
	TimeMin  float64
	Area     float64
	Height   float64
	WidthMin float64
}

// Chromatogram is what rampwise takes from an AIA/ANDI chromatography file:
// the detector trace sampled every IntervalS seconds from DelayS, and the
// peak table when the file carries one.
type Chromatogram struct {
	DelayS    float64   // actual_delay_time, s
	IntervalS float64   // actual_sampling_interval, s
	Values    []float64 // ordinate_values
	Peaks     []Peak    // from peak_retention_time etc.; nil when absent
	Title     string    // the injection's sample name when given
}

// Time of sample i in minutes.
func (c *Chromatogram) Time(i int) float64 { return (c.DelayS + float64(i)*c.IntervalS) / 60 }

// Read reads an AIA/ANDI chromatography file. It opens only a regular
// file (a FIFO or a device is refused at once, never waited on:
// fsafe.ReadRegular).
func Read(path string) (*Chromatogram, error) {
	b, err := fsafe.ReadRegular(path, MaxFileSize)
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		switch {
		case errors.Is(err, fsafe.ErrNotRegular):
			return nil, fmt.Errorf("%s: %s", path, strings.TrimSuffix(err.Error(), ": "+fsafe.ErrNotRegular.Error()))
		case strings.Contains(err.Error(), "larger than"):
			return nil, fmt.Errorf("%s: larger than %d MiB", path, MaxFileSize>>20)
		}
		return nil, fmt.Errorf("%s: cannot read: %v", path, err)
	}
	c, err := DecodeChromatogram(b)
	if err != nil {
		return nil, fmt.Errorf("%s: %v", path, err)
	}
	return c, nil
}

func scalar(f *File, name string) (float64, bool) {
	v := f.Var(name)
	if v == nil {
		return 0, false
	}
	x := Floats(v.Value)
	if len(x) == 0 {
		return 0, false
	}
	return x[0], true
}

// DecodeChromatogram reads the ANDI variables from a netCDF classic file:
// ordinate_values, actual_sampling_interval and actual_delay_time (seconds),
// and when present the peak table peak_retention_time, peak_name,
// peak_area, peak_height, peak_width. Retention times are in seconds unless
// the global attribute retention_unit says minutes (from memory of the AIA
// chromatography template; the peak width is taken as the width at half
// height, which the template does not pin down).
func DecodeChromatogram(b []byte) (*Chromatogram, error) {
	f, err := Decode(b)
	if err != nil {
		return nil, err
	}
	c := &Chromatogram{}
	ov := f.Var("ordinate_values")
	if ov == nil {
		return nil, errors.New("no ordinate_values variable: not an AIA/ANDI chromatography file")
	}
	c.Values = Floats(ov.Value)
	if c.Values == nil {
		return nil, errors.New("ordinate_values is not numeric")
	}
	var ok bool
	if c.IntervalS, ok = scalar(f, "actual_sampling_interval"); !ok {
		return nil, errors.New("no actual_sampling_interval variable")
	}
	if !(c.IntervalS > 0) || c.IntervalS > 3600 || math.IsInf(c.IntervalS, 0) {
		return nil, fmt.Errorf("actual_sampling_interval %g s is not a sampling interval", c.IntervalS)
	}
	c.DelayS, _ = scalar(f, "actual_delay_time")
	if math.IsNaN(c.DelayS) || math.IsInf(c.DelayS, 0) || c.DelayS < -3600 || c.DelayS > 1e6 {
		return nil, fmt.Errorf("actual_delay_time %g s is implausible", c.DelayS)
	}
	for i, y := range c.Values {
		if math.IsNaN(y) || math.IsInf(y, 0) {
			return nil, fmt.Errorf("ordinate_values[%d] is not a finite number", i)
		}
	}
	if a := f.Attr("injection_sample_name"); a != nil {
		if s, ok := a.Value.(string); ok {
			c.Title = s
		}
	} else if a := f.Attr("sample_name"); a != nil {
		if s, ok := a.Value.(string); ok {
			c.Title = s
		}
	}
	if rt := f.Var("peak_retention_time"); rt != nil {
		tscale := 1.0 / 60
		if a := f.Attr("retention_unit"); a != nil {
			if s, ok := a.Value.(string); ok && strings.HasPrefix(strings.ToLower(strings.TrimSpace(s)), "min") {
				tscale = 1
			}
		}
		times := Floats(rt.Value)
		get := func(name string) []float64 {
			if v := f.Var(name); v != nil {
				if x := Floats(v.Value); len(x) == len(times) {
					return x
				}
			}
			return nil
		}
		area, height, width := get("peak_area"), get("peak_height"), get("peak_width")
		var names []string
		if v := f.Var("peak_name"); v != nil && len(v.Dims) == 2 {
			if s, ok := v.Value.(string); ok {
				w := f.Dims[v.Dims[1]].Len
				for i := 0; w > 0 && (i+1)*w <= len(s); i++ {
					names = append(names, strings.TrimSpace(strings.TrimRight(s[i*w:(i+1)*w], "\x00")))
				}
			}
		}
		for i, t := range times {
			if !(t > 0) || math.IsInf(t, 0) {
				continue
			}
			p := Peak{TimeMin: t * tscale}
			if i < len(names) {
				p.Name = names[i]
			}
			if area != nil {
				p.Area = area[i]
			}
			if height != nil {
				p.Height = height[i]
			}
			if width != nil && width[i] > 0 && !math.IsInf(width[i], 0) {
				p.WidthMin = width[i] * tscale
			}
			c.Peaks = append(c.Peaks, p)
		}
		if c.Peaks == nil {
			c.Peaks = []Peak{}
		}
	}
	return c, nil
}

// nameLen is the length of the peak_name strings written (the template's
// _30_byte_string dimension, from memory).
const nameLen = 30

// EncodeChromatogram writes c as an AIA/ANDI chromatography file in netCDF
// classic format (version 1). Layout written:
//
//	dimensions  point_number = len(Values), peak_number = len(Peaks) (when
//	            peaks are given), _30_byte_string = 30
//	globals     dataset_completeness = "C1+C2", aia_template_revision = "1.0",
//	            retention_unit = "seconds", injection_sample_name = Title
//	variables   float  actual_sampling_interval, actual_delay_time,
//	                   actual_run_time_length (s)
//	            float  ordinate_values(point_number)
//	            float  peak_retention_time, peak_area, peak_height,
//	                   peak_width (peak_number), seconds for times
//	            char   peak_name(peak_number, _30_byte_string)
func EncodeChromatogram(c *Chromatogram) ([]byte, error) {
	f := &File{Version: 1}
	f.Dims = append(f.Dims, Dim{Name: "point_number", Len: len(c.Values)})
	f.Attrs = []Attr{
		{Name: "dataset_completeness", Type: TypeChar, Value: "C1+C2"},
		{Name: "aia_template_revision", Type: TypeChar, Value: "1.0"},
		{Name: "retention_unit", Type: TypeChar, Value: "seconds"},
		{Name: "injection_sample_name", Type: TypeChar, Value: c.Title},
	}
	if c.Title == "" {
		f.Attrs = f.Attrs[:3]
	}
	ys := make([]float32, len(c.Values))
	for i, y := range c.Values {
		ys[i] = float32(y)
	}
	sc := func(name string, x float64) Var {
		return Var{Name: name, Type: TypeFloat, Value: []float32{float32(x)}}
	}
	runLen := float64(len(c.Values)) * c.IntervalS
	f.Vars = []Var{
		sc("actual_sampling_interval", c.IntervalS),
		sc("actual_delay_time", c.DelayS),
		sc("actual_run_time_length", runLen),
		{Name: "ordinate_values", Dims: []int{0}, Type: TypeFloat, Value: ys,
			Attrs: []Attr{{Name: "uniform_sampling_flag", Type: TypeChar, Value: "Y"}}},
	}
	if len(c.Peaks) > 0 {
		f.Dims = append(f.Dims, Dim{Name: "peak_number", Len: len(c.Peaks)}, Dim{Name: "_30_byte_string", Len: nameLen})
		n := len(c.Peaks)
		rt, ar, ht, wd := make([]float32, n), make([]float32, n), make([]float32, n), make([]float32, n)
		var names strings.Builder
		for i, p := range c.Peaks {
			rt[i], ar[i], ht[i], wd[i] = float32(p.TimeMin*60), float32(p.Area), float32(p.Height), float32(p.WidthMin*60)
			nm := p.Name
			if len(nm) > nameLen {
				nm = nm[:nameLen]
			}
			names.WriteString(nm)
			names.WriteString(strings.Repeat("\x00", nameLen-len(nm)))
		}
		f.Vars = append(f.Vars,
			Var{Name: "peak_retention_time", Dims: []int{1}, Type: TypeFloat, Value: rt},
			Var{Name: "peak_area", Dims: []int{1}, Type: TypeFloat, Value: ar},
			Var{Name: "peak_height", Dims: []int{1}, Type: TypeFloat, Value: ht},
			Var{Name: "peak_width", Dims: []int{1}, Type: TypeFloat, Value: wd},
			Var{Name: "peak_name", Dims: []int{1, 2}, Type: TypeChar, Value: names.String()},
		)
	}
	return Encode(f)
}
