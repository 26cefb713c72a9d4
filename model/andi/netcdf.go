// Package andi reads and writes chromatograms in the AIA/ANDI chromatography
// data interchange format (ASTM E1947, Analytical Data Interchange for
// chromatography), which is stored as a netCDF classic file.
//
// The netCDF part follows the published Unidata specification "The NetCDF
// Classic Format Specification" (netCDF Users Guide, file format
// appendix): the CDF-1 classic format and the CDF-2 64-bit offset format,
// big-endian, header then data, names and values padded to 4 bytes,
// non-record variables contiguous at their begin offset and record
// variables interleaved record by record. The 64-bit data format (CDF-5)
// and netCDF-4/HDF5 files are not read; the error says so.
package andi

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"strings"
)

// netCDF external types (classic spec: NC_BYTE … NC_DOUBLE).
const (
	TypeByte   = 1
	TypeChar   = 2
	TypeShort  = 3
	TypeInt    = 4
	TypeFloat  = 5
	TypeDouble = 6
)

const (
	tagDimension = 0x0A
	tagVariable  = 0x0B
	tagAttribute = 0x0C
	streaming    = 0xFFFFFFFF
)

// limits that keep a corrupt header from asking for huge allocations.
const (
	maxHeaderItems = 1 << 16
	maxNameLen     = 1 << 12
	maxValues      = 1 << 26
)

// Dim is a dimension; Len 0 marks the record (unlimited) dimension.
type Dim struct {
	Name string
	Len  int
}

// Attr is an attribute: Type and its values (string for NC_CHAR, []int8,
// []int16, []int32, []float32 or []float64).
type Attr struct {
	Name  string
	Type  int
	Value any
}

// Var is a variable with its data decoded (same value types as Attr).
type Var struct {
	Name  string
	Dims  []int // dimension ids
	Attrs []Attr
	Type  int
	Value any
}

// File is a decoded netCDF classic file.
type File struct {
	Version int // 1 classic, 2 64-bit offset
	NumRecs int
	Dims    []Dim
	Attrs   []Attr
	Vars    []Var
}

// FormatError is a malformed file.
type FormatError struct {
	Offset int64
	Msg    string
}

func (e *FormatError) Error() string { return fmt.Sprintf("netCDF byte %d: %s", e.Offset, e.Msg) }

type reader struct {
	b   []byte
	off int64
	v   int
}

func (r *reader) fail(format string, args ...any) error {
	return &FormatError{Offset: r.off, Msg: fmt.Sprintf(format, args...)}
}

func (r *reader) u32() (uint32, error) {
	if r.off+4 > int64(len(r.b)) {
		return 0, r.fail("file ends inside the header")
	}
	x := binary.BigEndian.Uint32(r.b[r.off:])
	r.off += 4
	return x, nil
}

func (r *reader) count(what string) (int, error) {
	x, err := r.u32()
	if err != nil {
		return 0, err
	}
	if x > maxHeaderItems {
		return 0, r.fail("%d %s is more than this reader accepts", x, what)
	}
	return int(x), nil
}

func (r *reader) name() (string, error) {
	n, err := r.u32()
	if err != nil {
		return "", err
	}
	if n > maxNameLen || r.off+int64(pad4(int(n))) > int64(len(r.b)) {
		return "", r.fail("name length %d runs past the file", n)
	}
	s := string(r.b[r.off : r.off+int64(n)])
	r.off += int64(pad4(int(n)))
	return s, nil
}

func pad4(n int) int { return (n + 3) &^ 3 }

func typeSize(t int) int {
	switch t {
	case TypeByte, TypeChar:
		return 1
	case TypeShort:
		return 2
	case TypeInt, TypeFloat:
		return 4
	case TypeDouble:
		return 8
	}
	return 0
}

// values decodes n values of type t from b.
func values(b []byte, t, n int) any {
	switch t {
	case TypeChar:
		return string(b[:n])
	case TypeByte:
		v := make([]int8, n)
		for i := range v {
			v[i] = int8(b[i])
		}
		return v
	case TypeShort:
		v := make([]int16, n)
		for i := range v {
			v[i] = int16(binary.BigEndian.Uint16(b[2*i:]))
		}
		return v
	case TypeInt:
		v := make([]int32, n)
		for i := range v {
			v[i] = int32(binary.BigEndian.Uint32(b[4*i:]))
		}
		return v
	case TypeFloat:
		v := make([]float32, n)
		for i := range v {
			v[i] = math.Float32frombits(binary.BigEndian.Uint32(b[4*i:]))
		}
		return v
	case TypeDouble:
		v := make([]float64, n)
		for i := range v {
			v[i] = math.Float64frombits(binary.BigEndian.Uint64(b[8*i:]))
		}
		return v
	}
	return nil
}

func (r *reader) attrs() ([]Attr, error) {
	tag, err := r.u32()
	if err != nil {
		return nil, err
	}
	n, err := r.count("attributes")
	if err != nil {
		return nil, err
	}
	if tag == 0 && n == 0 {
		return nil, nil
	}
	if tag != tagAttribute {
		return nil, r.fail("expected an attribute list (tag 0x0C), found 0x%X", tag)
	}
	out := make([]Attr, 0, min(n, 256))
	for i := 0; i < n; i++ {
		name, err := r.name()
		if err != nil {
			return nil, err
		}
		t, err := r.u32()
		if err != nil {
			return nil, err
		}
		sz := typeSize(int(t))
		if sz == 0 {
			return nil, r.fail("attribute %q has unknown type %d", name, t)
		}
		cnt, err := r.u32()
		if err != nil {
			return nil, err
		}
		nb := int64(cnt) * int64(sz)
		if cnt > maxValues || r.off+int64(pad4(int(nb))) > int64(len(r.b)) {
			return nil, r.fail("attribute %q: %d values run past the file", name, cnt)
		}
		val := values(r.b[r.off:], int(t), int(cnt))
		if s, ok := val.(string); ok {
			val = strings.TrimRight(s, "\x00")
		}
		out = append(out, Attr{Name: name, Type: int(t), Value: val})
		r.off += int64(pad4(int(nb)))
	}
	return out, nil
}

// Decode parses a netCDF classic (CDF-1) or 64-bit offset (CDF-2) file held
// in memory.
func Decode(b []byte) (*File, error) {
	r := &reader{b: b}
	if len(b) < 4 || string(b[:3]) != "CDF" {
		if len(b) >= 8 && string(b[1:4]) == "HDF" {
			return nil, errors.New("this is a netCDF-4 (HDF5) file; export the chromatogram as netCDF classic (AIA/ANDI)")
		}
		return nil, errors.New("not a netCDF file (no CDF signature)")
	}
	f := &File{Version: int(b[3])}
	if f.Version == 5 {
		return nil, errors.New("this is a netCDF 64-bit data (CDF-5) file; only the classic and 64-bit offset formats are read")
	}
	if f.Version != 1 && f.Version != 2 {
		return nil, fmt.Errorf("unknown netCDF version byte %d", f.Version)
	}
	r.v = f.Version
	r.off = 4
	nr, err := r.u32()
	if err != nil {
		return nil, err
	}
	if nr != streaming {
		if nr > maxValues {
			return nil, r.fail("record count %d is implausible", nr)
		}
		f.NumRecs = int(nr)
	}
	// dimensions
	tag, err := r.u32()
	if err != nil {
		return nil, err
	}
	nd, err := r.count("dimensions")
	if err != nil {
		return nil, err
	}
	if !(tag == 0 && nd == 0) && tag != tagDimension {
		return nil, r.fail("expected a dimension list (tag 0x0A), found 0x%X", tag)
	}
	recDim := -1
	for i := 0; i < nd; i++ {
		name, err := r.name()
		if err != nil {
			return nil, err
		}
		l, err := r.u32()
		if err != nil {
			return nil, err
		}
		if l > maxValues {
			return nil, r.fail("dimension %q length %d is implausible", name, l)
		}
		if l == 0 {
			if recDim >= 0 {
				return nil, r.fail("two record dimensions")
			}
			recDim = i
		}
		f.Dims = append(f.Dims, Dim{Name: name, Len: int(l)})
	}
	if f.Attrs, err = r.attrs(); err != nil {
		return nil, err
	}
	// variables
	tag, err = r.u32()
	if err != nil {
		return nil, err
	}
	nv, err := r.count("variables")
	if err != nil {
		return nil, err
	}
	if !(tag == 0 && nv == 0) && tag != tagVariable {
		return nil, r.fail("expected a variable list (tag 0x0B), found 0x%X", tag)
	}
	type layout struct {
		begin  int64
		vsize  int64
		record bool
		n      int // values per record (record var) or in total
	}
	lay := make([]layout, 0, min(nv, 256))
	for i := 0; i < nv; i++ {
		name, err := r.name()
		if err != nil {
			return nil, err
		}
		ndims, err := r.count("dimensions of a variable")
		if err != nil {
			return nil, err
		}
		v := Var{Name: name}
		n := 1
		rec := false
		for j := 0; j < ndims; j++ {
			id, err := r.u32()
			if err != nil {
				return nil, err
			}
			if int(id) >= len(f.Dims) {
				return nil, r.fail("variable %q uses dimension %d of %d", name, id, len(f.Dims))
			}
			v.Dims = append(v.Dims, int(id))
			if int(id) == recDim {
				if j != 0 {
					return nil, r.fail("variable %q: the record dimension must come first", name)
				}
				rec = true
				continue
			}
			n *= f.Dims[id].Len
			if n > maxValues {
				return nil, r.fail("variable %q is too large", name)
			}
		}
		if v.Attrs, err = r.attrs(); err != nil {
			return nil, err
		}
		t, err := r.u32()
		if err != nil {
			return nil, err
		}
		if typeSize(int(t)) == 0 {
			return nil, r.fail("variable %q has unknown type %d", name, t)
		}
		v.Type = int(t)
		vs, err := r.u32()
		if err != nil {
			return nil, err
		}
		var begin int64
		if f.Version == 1 {
			b, err := r.u32()
			if err != nil {
				return nil, err
			}
			begin = int64(b)
		} else {
			hi, err := r.u32()
			if err != nil {
				return nil, err
			}
			lo, err := r.u32()
			if err != nil {
				return nil, err
			}
			begin = int64(hi)<<32 | int64(lo)
			if begin < 0 {
				return nil, r.fail("variable %q begins at a negative offset", name)
			}
		}
		f.Vars = append(f.Vars, v)
		lay = append(lay, layout{begin: begin, vsize: int64(vs), record: rec, n: n})
	}
	// the record size: sum of the record variables' vsize (a single record
	// variable of a small type is not padded, per the spec)
	var recSize int64
	nrec := 0
	for i, l := range lay {
		if l.record {
			nrec++
			recSize += int64(pad4(l.n * typeSize(f.Vars[i].Type)))
		}
	}
	if nrec == 1 {
		for i, l := range lay {
			if l.record {
				recSize = int64(l.n * typeSize(f.Vars[i].Type))
			}
		}
	}
	if f.NumRecs == 0 && nr == streaming && recSize > 0 {
		// streaming: as many whole records as the file holds
		var first int64 = math.MaxInt64
		for _, l := range lay {
			if l.record {
				first = min(first, l.begin)
			}
		}
		if first < int64(len(b)) {
			f.NumRecs = int((int64(len(b)) - first) / recSize)
		}
	}
	if recDim >= 0 {
		f.Dims[recDim].Len = f.NumRecs
	}
	for i := range f.Vars {
		v := &f.Vars[i]
		l := lay[i]
		sz := int64(typeSize(v.Type))
		if !l.record {
			nb := int64(l.n) * sz
			if l.begin < 0 || l.begin+nb > int64(len(b)) || l.begin+nb < l.begin {
				return nil, &FormatError{Offset: l.begin, Msg: fmt.Sprintf("variable %q: its data run past the end of the file", v.Name)}
			}
			v.Value = values(b[l.begin:], v.Type, l.n)
			continue
		}
		total := int64(l.n) * int64(f.NumRecs)
		if total > maxValues {
			return nil, &FormatError{Offset: l.begin, Msg: fmt.Sprintf("variable %q is too large", v.Name)}
		}
		if f.NumRecs > 0 {
			last := l.begin + int64(f.NumRecs-1)*recSize + int64(l.n)*sz
			if l.begin < 0 || (recSize <= 0 && l.n > 0) || last > int64(len(b)) || last < l.begin {
				return nil, &FormatError{Offset: l.begin, Msg: fmt.Sprintf("variable %q: its records run past the end of the file", v.Name)}
			}
		}
		buf := make([]byte, 0, total*sz)
		for rec := 0; rec < f.NumRecs; rec++ {
			at := l.begin + int64(rec)*recSize
			nb := int64(l.n) * sz
			if at < 0 || at+nb > int64(len(b)) {
				return nil, &FormatError{Offset: at, Msg: fmt.Sprintf("variable %q: record %d runs past the end of the file", v.Name, rec)}
			}
			buf = append(buf, b[at:at+nb]...)
		}
		v.Value = values(buf, v.Type, int(total))
	}
	return f, nil
}

// Var finds a variable by name.
func (f *File) Var(name string) *Var {
	for i := range f.Vars {
		if f.Vars[i].Name == name {
			return &f.Vars[i]
		}
	}
	return nil
}

// Attr finds a global attribute by name.
func (f *File) Attr(name string) *Attr {
	for i := range f.Attrs {
		if f.Attrs[i].Name == name {
			return &f.Attrs[i]
		}
	}
	return nil
}

// Floats returns numeric values as float64 (nil for text).
func Floats(v any) []float64 {
	switch x := v.(type) {
	case []float64:
		return x
	case []float32:
		out := make([]float64, len(x))
		for i, y := range x {
			out[i] = float64(y)
		}
		return out
	case []int32:
		out := make([]float64, len(x))
		for i, y := range x {
			out[i] = float64(y)
		}
		return out
	case []int16:
		out := make([]float64, len(x))
		for i, y := range x {
			out[i] = float64(y)
		}
		return out
	case []int8:
		out := make([]float64, len(x))
		for i, y := range x {
			out[i] = float64(y)
		}
		return out
	}
	return nil
}

// Encode writes f as a netCDF classic file (Version 1, or 2 for 64-bit
// offsets). Values must be of the Go type matching each Type; a variable
// whose first dimension has Len 0 is a record variable with NumRecs
// records.
func Encode(f *File) ([]byte, error) {
	if f.Version != 1 && f.Version != 2 {
		return nil, fmt.Errorf("netCDF version %d: write 1 or 2", f.Version)
	}
	var h []byte
	u32 := func(x uint32) { h = binary.BigEndian.AppendUint32(h, x) }
	name := func(s string) {
		u32(uint32(len(s)))
		h = append(h, s...)
		for len(h)%4 != 0 {
			h = append(h, 0)
		}
	}
	raw := func(t int, v any, n int) ([]byte, error) {
		var b []byte
		switch x := v.(type) {
		case string:
			if t != TypeChar {
				return nil, errors.New("text value for a numeric type")
			}
			b = append(b, x...)
			for len(b) < n {
				b = append(b, 0)
			}
			if len(b) > n {
				return nil, fmt.Errorf("text of %d bytes for %d places", len(b), n)
			}
		case []int8:
			for _, y := range x {
				b = append(b, byte(y))
			}
		case []int16:
			for _, y := range x {
				b = binary.BigEndian.AppendUint16(b, uint16(y))
			}
		case []int32:
			for _, y := range x {
				b = binary.BigEndian.AppendUint32(b, uint32(y))
			}
		case []float32:
			for _, y := range x {
				b = binary.BigEndian.AppendUint32(b, math.Float32bits(y))
			}
		case []float64:
			for _, y := range x {
				b = binary.BigEndian.AppendUint64(b, math.Float64bits(y))
			}
		default:
			return nil, fmt.Errorf("unsupported value type %T", v)
		}
		if n >= 0 && len(b) != n*typeSize(t) {
			return nil, fmt.Errorf("%d bytes of data for %d values of type %d", len(b), n, t)
		}
		return b, nil
	}
	count := func(t int, v any) int {
		if s, ok := v.(string); ok {
			return len(s)
		}
		return len(Floats(v))
	}
	attrs := func(as []Attr) error {
		if len(as) == 0 {
			u32(0)
			u32(0)
			return nil
		}
		u32(tagAttribute)
		u32(uint32(len(as)))
		for _, a := range as {
			name(a.Name)
			u32(uint32(a.Type))
			n := count(a.Type, a.Value)
			u32(uint32(n))
			b, err := raw(a.Type, a.Value, n)
			if err != nil {
				return fmt.Errorf("attribute %q: %v", a.Name, err)
			}
			h = append(h, b...)
			for len(h)%4 != 0 {
				h = append(h, 0)
			}
		}
		return nil
	}
	h = append(h, 'C', 'D', 'F', byte(f.Version))
	u32(uint32(f.NumRecs))
	if len(f.Dims) == 0 {
		u32(0)
		u32(0)
	} else {
		u32(tagDimension)
		u32(uint32(len(f.Dims)))
		for _, d := range f.Dims {
			name(d.Name)
			u32(uint32(d.Len))
		}
	}
	if err := attrs(f.Attrs); err != nil {
		return nil, err
	}
	// sizes
	type lay struct {
		n      int
		record bool
		data   []byte
		vsize  int
	}
	ls := make([]lay, len(f.Vars))
	nrec := 0
	for i, v := range f.Vars {
		n := 1
		rec := false
		for j, id := range v.Dims {
			if id < 0 || id >= len(f.Dims) {
				return nil, fmt.Errorf("variable %q: no dimension %d", v.Name, id)
			}
			if f.Dims[id].Len == 0 {
				if j != 0 {
					return nil, fmt.Errorf("variable %q: the record dimension must come first", v.Name)
				}
				rec = true
				continue
			}
			n *= f.Dims[id].Len
		}
		total := n
		if rec {
			total = n * f.NumRecs
			nrec++
		}
		b, err := raw(v.Type, v.Value, total)
		if err != nil {
			return nil, fmt.Errorf("variable %q: %v", v.Name, err)
		}
		ls[i] = lay{n: n, record: rec, data: b, vsize: pad4(n * typeSize(v.Type))}
	}
	// header length: write it once with zero begins to measure
	varHeader := func(begins []int64) error {
		if len(f.Vars) == 0 {
			u32(0)
			u32(0)
			return nil
		}
		u32(tagVariable)
		u32(uint32(len(f.Vars)))
		for i, v := range f.Vars {
			name(v.Name)
			u32(uint32(len(v.Dims)))
			for _, id := range v.Dims {
				u32(uint32(id))
			}
			if err := attrs(v.Attrs); err != nil {
				return fmt.Errorf("variable %q: %v", v.Name, err)
			}
			u32(uint32(v.Type))
			u32(uint32(ls[i].vsize))
			if f.Version == 1 {
				if begins[i] > math.MaxUint32 {
					return errors.New("data beyond 4 GiB: write version 2")
				}
				u32(uint32(begins[i]))
			} else {
				u32(uint32(begins[i] >> 32))
				u32(uint32(begins[i]))
			}
		}
		return nil
	}
	start := len(h)
	begins := make([]int64, len(f.Vars))
	if err := varHeader(begins); err != nil {
		return nil, err
	}
	hdrLen := int64(len(h))
	h = h[:start]
	off := hdrLen
	for i := range f.Vars {
		if !ls[i].record {
			begins[i] = off
			off += int64(ls[i].vsize)
		}
	}
	recSize := 0
	for i := range f.Vars {
		if ls[i].record {
			begins[i] = off + int64(recSize)
			if nrec == 1 {
				recSize += ls[i].n * typeSize(f.Vars[i].Type)
			} else {
				recSize += ls[i].vsize
			}
		}
	}
	if err := varHeader(begins); err != nil {
		return nil, err
	}
	for i := range f.Vars {
		if !ls[i].record {
			h = append(h, ls[i].data...)
			for len(h)%4 != 0 {
				h = append(h, 0)
			}
		}
	}
	for rec := 0; rec < f.NumRecs; rec++ {
		for i := range f.Vars {
			if !ls[i].record {
				continue
			}
			sz := ls[i].n * typeSize(f.Vars[i].Type)
			h = append(h, ls[i].data[rec*sz:(rec+1)*sz]...)
			if nrec > 1 {
				for j := sz; j < ls[i].vsize; j++ {
					h = append(h, 0)
				}
			}
		}
	}
	return h, nil
}
