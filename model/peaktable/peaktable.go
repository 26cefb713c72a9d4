// Package peaktable reads the peak tables chromatography data systems export
// as delimited text: one row per peak with its retention time and, when
// given, its name, area, height and width.
//
// The reader decides by itself the separator (comma, semicolon or tab), the
// decimal mark (point or comma), whether a header row exists, which column
// holds what (from the header words, else from the values) and whether times
// are in minutes or seconds (from the header's unit, else from the values).
// Anything it cannot decide is an error that says which of these it was, and
// a Columns value given by the user (the runs file's [run.columns]) settles
// it. A UTF-8 byte-order mark, lines before the header (sample information),
// extra columns, quoted cells, thousands separators (15,234.1 or 1.234,5)
// and a footer of totals are tolerated.
//
// Widths are converted to the width at half height: a header naming a base
// (tangent) width is divided by 4 and multiplied by 2√(2 ln 2) (a Gaussian's
// base width is 4σ; common practice), a header naming sigma (standard
// deviation) is multiplied by 2√(2 ln 2); any other width is taken as the
// half-height width.
package peaktable

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"strconv"
	"strings"

	"github.com/rampwise/rampwise/model/fsafe"
	"unicode/utf8"
)

// MaxFileSize caps what Read accepts (a peak table is small).
const MaxFileSize = 8 << 20

// MaxPeaks caps the rows of one table.
const MaxPeaks = 20000

// fwhmPerSigma is 2√(2 ln 2).
const fwhmPerSigma = 2.3548200450309493

// Peak is one row. Times and widths in minutes; WidthMin is the width at
// half height whatever the file gave.
type Peak struct {
	Name     string
	TimeMin  float64
	Area     float64
	Height   float64
	WidthMin float64
	HasArea  bool
	HasHgt   bool
	HasWidth bool
	Line     int // line in the file
}

// Columns says what the reader must not guess. Zero fields are detected.
// Time, Name, Area, Height and Width name a column by its header text
// (case-insensitive) or by its 1-based number.
type Columns struct {
	Time, Name, Area, Height, Width string
	TimeUnit                        string // "min" or "s"
	WidthKind                       string // "half-height", "base" or "sigma"
	Separator                       string // ",", ";" or "tab"
	Decimal                         string // "." or ","
}

// Table is a read peak table and what the reader decided.
type Table struct {
	File      string
	Peaks     []Peak // in file order
	Separator string // ",", ";" or "tab"
	Decimal   string // "." or ","
	Header    bool
	TimeUnit  string         // "min" or "s"
	WidthKind string         // "half-height", "base", "sigma" or "" without widths
	Columns   map[string]int // role -> 0-based column
}

// Error is a problem with a peak table: where it is and what is wrong.
type Error struct {
	File  string
	Line  int    // 0 when not about one line
	Field string // the column or decision concerned
	Msg   string
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Field != "" {
		fmt.Fprintf(&b, ": %s", e.Field)
	}
	fmt.Fprintf(&b, ": %s", e.Msg)
	return b.String()
}

// Read reads a peak table file. It opens only a regular file (a FIFO or
// a device is refused at once, never waited on: fsafe.ReadRegular).
func Read(path string, cols Columns) (*Table, error) {
	data, err := fsafe.ReadRegular(path, MaxFileSize)
	if err != nil {
		return nil, &Error{File: path, Msg: readError(err)}
	}
	return Parse(path, data, cols)
}

// readError is why a file could not be read, without the path (Error
// names it).
func readError(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		err = pe.Err
	}
	if errors.Is(err, fsafe.ErrNotRegular) {
		return strings.TrimSuffix(err.Error(), ": "+fsafe.ErrNotRegular.Error())
	}
	if strings.Contains(err.Error(), "larger than") {
		return fmt.Sprintf("larger than %d MiB: not a peak table", MaxFileSize>>20)
	}
	return "cannot read: " + err.Error()
}

type line struct {
	n     int
	text  string
	cells []string
}

// Parse reads a peak table's contents; name is used in errors.
func Parse(name string, data []byte, cols Columns) (*Table, error) {
	fail := func(ln int, field, format string, args ...any) error {
		return &Error{File: name, Line: ln, Field: field, Msg: fmt.Sprintf(format, args...)}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if len(data) >= 2 && (data[0] == 0xff && data[1] == 0xfe || data[0] == 0xfe && data[1] == 0xff) {
		return nil, fail(0, "encoding", "the file is UTF-16; export it as UTF-8 (or plain text)")
	}
	if !utf8.Valid(data) {
		return nil, fail(0, "encoding", "not UTF-8 text")
	}
	if bytes.IndexByte(data, 0) >= 0 {
		return nil, fail(0, "encoding", "binary data, not a text peak table")
	}
	var lines []line
	for i, s := range strings.Split(strings.ReplaceAll(string(data), "\r\n", "\n"), "\n") {
		s = strings.TrimRight(s, "\r")
		t := strings.TrimSpace(s)
		if t == "" {
			continue
		}
		lines = append(lines, line{n: i + 1, text: s})
	}
	if len(lines) == 0 {
		return nil, fail(0, "", "empty: no peak rows")
	}
	tab := &Table{File: name, Columns: map[string]int{}}

	// separator
	sep, err := chooseSeparator(lines, cols.Separator)
	if err != nil {
		return nil, fail(0, "separator", "%v", err)
	}
	tab.Separator = sepName(sep)
	for i := range lines {
		lines[i].cells = split(lines[i].text, sep)
	}

	// header: the first line with a cell that names a retention time
	hdr := -1
	for i, l := range lines {
		if i > 50 {
			break
		}
		if _, ok := findRole(l.cells, "time"); ok {
			hdr = i
			break
		}
		if cols.Time != "" && !isIndex(cols.Time) && indexOf(l.cells, cols.Time) >= 0 {
			hdr = i
			break
		}
	}
	var header []string
	body := lines
	if hdr >= 0 {
		header = lines[hdr].cells
		body = lines[hdr+1:]
		tab.Header = true
	}

	// decimal mark
	dec, err := chooseDecimal(body, sep, cols.Decimal)
	if err != nil {
		return nil, fail(0, "decimal mark", "%v", err)
	}
	tab.Decimal = string(dec)
	num := func(s string) (float64, bool) { return parseNum(s, dec) }

	// columns
	width := 0
	for _, l := range body {
		width = max(width, len(l.cells))
	}
	width = max(width, len(header))
	pick := func(role, given string) (int, error) {
		if given != "" {
			if isIndex(given) {
				k, _ := strconv.Atoi(given)
				if k < 1 || k > width {
					return -1, fmt.Errorf("[run.columns] %s = %q: the table has %d columns", role, given, width)
				}
				return k - 1, nil
			}
			if header == nil {
				return -1, fmt.Errorf("[run.columns] %s = %q names a header, but the table has no header row", role, given)
			}
			k := indexOf(header, given)
			if k < 0 {
				return -1, fmt.Errorf("[run.columns] %s = %q: no such column in the header (%s)", role, given, strings.Join(header, ", "))
			}
			return k, nil
		}
		if header != nil {
			if k, ok := findRole(header, role); ok {
				return k, nil
			}
		}
		return -1, nil
	}
	for _, role := range []string{"time", "name", "area", "height", "width"} {
		given := map[string]string{"time": cols.Time, "name": cols.Name, "area": cols.Area, "height": cols.Height, "width": cols.Width}[role]
		k, err := pick(role, given)
		if err != nil {
			return nil, fail(0, role+" column", "%v", err)
		}
		if k >= 0 {
			tab.Columns[role] = k
		}
	}
	if _, ok := tab.Columns["time"]; !ok {
		k, err := guessTimeColumn(body, width, num)
		if err != nil {
			return nil, fail(0, "retention-time column", "%v; name it with time = \"…\" in [run.columns]", err)
		}
		tab.Columns["time"] = k
		if _, ok := tab.Columns["name"]; !ok && header == nil {
			if k := guessNameColumn(body, width, num); k >= 0 {
				tab.Columns["name"] = k
			}
		}
	}
	tc := tab.Columns["time"]

	// rows: data until a footer; a footer is the non-numeric tail
	type row struct {
		l line
		t float64
	}
	var rows []row
	lastData := -1
	for i, l := range body {
		if tc < len(l.cells) {
			if t, ok := num(l.cells[tc]); ok {
				rows = append(rows, row{l, t})
				lastData = i
				continue
			}
		}
		rows = append(rows, row{l, math.NaN()})
	}
	if lastData < 0 {
		return nil, fail(0, "retention-time column", "no row has a number in column %d%s", tc+1, headerName(header, tc))
	}
	rows = rows[:lastData+1]
	firstData := 0
	for firstData < len(rows) && math.IsNaN(rows[firstData].t) {
		firstData++
	}
	if header != nil && firstData > 0 {
		r := rows[0]
		return nil, fail(r.l.n, fieldName(header, tc, "retention time"), "%q is not a number", cellAt(r.l.cells, tc))
	}
	rows = rows[firstData:]
	if len(rows) > MaxPeaks {
		return nil, fail(rows[MaxPeaks].l.n, "", "more than %d peaks", MaxPeaks)
	}

	// time unit
	unit := strings.ToLower(cols.TimeUnit)
	switch unit {
	case "", "min", "s":
	default:
		return nil, fail(0, "time unit", "[run.columns] time_unit = %q: use \"min\" or \"s\"", cols.TimeUnit)
	}
	if unit == "" && header != nil {
		unit = unitOf(header[tc])
	}
	if unit == "" {
		hi := 0.0
		for _, r := range rows {
			if !math.IsNaN(r.t) {
				hi = math.Max(hi, r.t)
			}
		}
		switch {
		case hi <= 100:
			unit = "min"
		case hi >= 200:
			unit = "s"
		default:
			return nil, fail(0, "time unit", "the header gives no unit and the latest peak at %g could be minutes or seconds; put the unit in the header, e.g. \"RT (min)\", or time_unit in [run.columns]", hi)
		}
	}
	tab.TimeUnit = unit
	scale := 1.0
	if unit == "s" {
		scale = 1.0 / 60
	}

	// width kind
	if wc, ok := tab.Columns["width"]; ok {
		kind := strings.ToLower(cols.WidthKind)
		switch kind {
		case "", "half-height", "base", "sigma":
		default:
			return nil, fail(0, "width kind", "[run.columns] width_kind = %q: use \"half-height\", \"base\" or \"sigma\"", cols.WidthKind)
		}
		if kind == "" {
			kind = "half-height"
			if header != nil {
				kind = widthKind(header[wc])
			}
		}
		tab.WidthKind = kind
	}
	wunit := unit
	if wc, ok := tab.Columns["width"]; ok && header != nil {
		if u := unitOf(header[wc]); u != "" {
			wunit = u
		}
	}
	wscale := 1.0
	if wunit == "s" {
		wscale = 1.0 / 60
	}
	switch tab.WidthKind {
	case "base":
		wscale *= fwhmPerSigma / 4
	case "sigma":
		wscale *= fwhmPerSigma
	}

	for _, r := range rows {
		l := r.l
		if math.IsNaN(r.t) {
			return nil, fail(l.n, fieldName(header, tc, "retention time"), "%q is not a number", cellAt(l.cells, tc))
		}
		if !(r.t > 0) || math.IsInf(r.t, 0) {
			return nil, fail(l.n, fieldName(header, tc, "retention time"), "%q: a retention time must be positive", cellAt(l.cells, tc))
		}
		p := Peak{TimeMin: r.t * scale, Line: l.n}
		if k, ok := tab.Columns["name"]; ok && k < len(l.cells) {
			p.Name = strings.TrimSpace(l.cells[k])
		}
		opt := func(role string, dst *float64, has *bool, sc float64) error {
			k, ok := tab.Columns[role]
			if !ok || k >= len(l.cells) || strings.TrimSpace(l.cells[k]) == "" {
				return nil
			}
			x, ok := num(l.cells[k])
			if !ok || x < 0 || math.IsInf(x, 0) {
				return fail(l.n, fieldName(header, k, role), "%q is not a non-negative number", l.cells[k])
			}
			*dst, *has = x*sc, true
			return nil
		}
		if err := opt("area", &p.Area, &p.HasArea, 1); err != nil {
			return nil, err
		}
		if err := opt("height", &p.Height, &p.HasHgt, 1); err != nil {
			return nil, err
		}
		if err := opt("width", &p.WidthMin, &p.HasWidth, wscale); err != nil {
			return nil, err
		}
		if p.HasWidth && p.WidthMin == 0 {
			p.HasWidth = false
		}
		tab.Peaks = append(tab.Peaks, p)
	}
	return tab, nil
}

func sepName(r rune) string {
	if r == '\t' {
		return "tab"
	}
	return string(r)
}

// chooseSeparator picks the separator that splits the most lines into the
// same number (≥ 2) of cells.
func chooseSeparator(lines []line, given string) (rune, error) {
	switch given {
	case ",":
		return ',', nil
	case ";":
		return ';', nil
	case "tab", "\t":
		return '\t', nil
	case "":
	default:
		return 0, fmt.Errorf("[run.columns] separator = %q: use \",\", \";\" or \"tab\"", given)
	}
	best, bestScore := rune(0), 0
	for _, sep := range []rune{'\t', ';', ','} {
		counts := map[int]int{}
		for i, l := range lines {
			if i >= 60 {
				break
			}
			if n := len(split(l.text, sep)); n >= 2 {
				counts[n]++
			}
		}
		score := 0
		for _, c := range counts {
			score = max(score, c)
		}
		if score > bestScore {
			best, bestScore = sep, score
		}
	}
	if best == 0 {
		// one column only: a list of retention times
		return ',', nil
	}
	return best, nil
}

// chooseDecimal: with a comma separator the mark is a point; otherwise a
// comma when numbers like 3,14 occur and none like 3.14.
func chooseDecimal(body []line, sep rune, given string) (rune, error) {
	switch given {
	case ".":
		if sep == ',' {
			return 0, errors.New("[run.columns] decimal = \".\" is fine, but the separator is also needed")
		}
		return '.', nil
	case ",":
		if sep == ',' {
			return 0, errors.New("[run.columns] decimal = \",\" with a comma separator cannot be read; give separator = \";\" or \"tab\"")
		}
		return ',', nil
	case "":
	default:
		return 0, fmt.Errorf("[run.columns] decimal = %q: use \".\" or \",\"", given)
	}
	if sep == ',' {
		return '.', nil
	}
	comma, point := 0, 0
	for _, l := range body {
		for _, c := range l.cells {
			c = strings.TrimSpace(c)
			ic, ip := strings.LastIndex(c, ","), strings.LastIndex(c, ".")
			switch {
			case ic >= 0 && ip >= 0 && ip > ic && grouped(c, ',', '.'):
				point++ // 15,234.1
			case ic >= 0 && ip >= 0 && ic > ip && grouped(c, '.', ','):
				comma++ // 1.234,5
			case looksDecimal(c, ','):
				comma++
			case looksDecimal(c, '.'):
				point++
			}
		}
	}
	switch {
	case comma > 0 && point == 0:
		return ',', nil
	case comma > 0 && point > 0:
		return 0, fmt.Errorf("both 3,14 and 3.14 style numbers occur; give decimal = \",\" or \".\" in [run.columns]")
	}
	return '.', nil
}

func looksDecimal(c string, mark rune) bool {
	i := strings.IndexRune(c, mark)
	if i <= 0 || i == len(c)-1 || strings.Count(c, string(mark)) != 1 {
		return false
	}
	for j, r := range c {
		if j == i {
			continue
		}
		if (r < '0' || r > '9') && !(j == 0 && (r == '-' || r == '+')) && r != 'e' && r != 'E' {
			return false
		}
	}
	return true
}

// grouped: s (sign removed) is digits in groups of three split by sep
// before an optional decimal part: 1.234.567,8 or 15,234.1.
func grouped(s string, sep, dec rune) bool {
	s = strings.TrimLeft(s, "+-")
	if i := strings.IndexRune(s, dec); i >= 0 {
		s = s[:i]
	}
	parts := strings.Split(s, string(sep))
	if len(parts) < 2 || len(parts[0]) < 1 || len(parts[0]) > 3 {
		return false
	}
	for i, p := range parts {
		if i > 0 && len(p) != 3 {
			return false
		}
		for _, r := range p {
			if r < '0' || r > '9' {
				return false
			}
		}
	}
	return true
}

func parseNum(s string, dec rune) (float64, bool) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, false
	}
	if dec == ',' {
		if strings.Contains(s, ".") {
			if !grouped(s, '.', ',') {
				return 0, false
			}
			s = strings.ReplaceAll(s, ".", "") // thousands points: 1.234,5
		}
		s = strings.Replace(s, ",", ".", 1)
	} else if strings.Contains(s, ",") {
		if !grouped(s, ',', '.') {
			return 0, false
		}
		s = strings.ReplaceAll(s, ",", "") // thousands commas: 15,234.1
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(x) {
		return 0, false
	}
	low := strings.ToLower(s)
	if strings.Contains(low, "inf") || strings.Contains(low, "x") || strings.Contains(low, "_") {
		return 0, false
	}
	return x, true
}

// split cuts one line at sep, honouring double quotes ("" inside quotes is
// a quote).
func split(s string, sep rune) []string {
	var out []string
	var b strings.Builder
	inQ := false
	rs := []rune(s)
	for i := 0; i < len(rs); i++ {
		r := rs[i]
		switch {
		case inQ && r == '"' && i+1 < len(rs) && rs[i+1] == '"':
			b.WriteRune('"')
			i++
		case r == '"':
			inQ = !inQ
		case r == sep && !inQ:
			out = append(out, strings.TrimSpace(b.String()))
			b.Reset()
		default:
			b.WriteRune(r)
		}
	}
	return append(out, strings.TrimSpace(b.String()))
}

func norm(s string) string {
	return strings.ToLower(strings.Join(strings.Fields(s), " "))
}

// words a header cell may hold, per role (common practice in data-system
// exports; matched on the lower-cased cell without its unit).
var roleWords = map[string][]string{
	"time":   {"retention time", "ret. time", "ret time", "rettime", "r.t.", "rt", "tr", "time", "retention", "apex time", "apex", "retentionszeit"},
	"name":   {"name", "compound", "component", "peak name", "compound name", "identity", "id name", "analyte"},
	"area":   {"area", "peak area", "area counts"},
	"height": {"height", "peak height", "hgt"},
	"width":  {"width", "fwhm", "w50", "w1/2", "half width", "half-height width", "peak width", "sigma", "base width", "width at half height", "width 50%"},
}

// stripUnit removes a trailing unit in brackets or after a space.
func stripUnit(h string) string {
	h = norm(h)
	for _, open := range []string{"(", "["} {
		if i := strings.Index(h, open); i > 0 {
			h = strings.TrimSpace(h[:i])
		}
	}
	for _, u := range []string{" min", " minutes", " s", " sec", " seconds", " [min]"} {
		h = strings.TrimSuffix(h, u)
	}
	return strings.TrimSpace(h)
}

func findRole(cells []string, role string) (int, bool) {
	best, bestScore := -1, 0
	for k, c := range cells {
		if sc := roleScore(stripUnit(c), role); sc > bestScore {
			best, bestScore = k, sc
		}
	}
	return best, best >= 0
}

// roleScore rates how surely a header cell (lower case, unit removed) names
// the role: 3 a known word, 2 a telling part, 1 a weak hint, 0 not at all.
func roleScore(h, role string) int {
	for _, w := range roleWords[role] {
		if h == w {
			return 3
		}
	}
	words := strings.FieldsFunc(h, func(r rune) bool { return r == ' ' || r == '.' || r == '_' || r == '-' || r == '/' })
	has := func(ws ...string) bool {
		for _, x := range words {
			for _, w := range ws {
				if x == w {
					return true
				}
			}
		}
		return false
	}
	switch role {
	case "time":
		if has("start", "end", "stop", "run", "date", "begin") {
			return 0
		}
		if strings.Contains(h, "retention") || has("rt", "tr", "apex", "ret") {
			return 2
		}
		if has("time", "zeit") {
			return 1
		}
	case "width":
		if strings.Contains(h, "width") || has("fwhm", "w50", "sigma", "breite") {
			return 2
		}
	case "area":
		if strings.Contains(h, "%") || has("percent", "pct") {
			return 0
		}
		if has("area", "fläche", "flaeche") {
			return 2
		}
	case "height":
		if strings.Contains(h, "%") || has("percent", "pct", "width") {
			return 0
		}
		if has("height", "höhe", "hoehe") {
			return 2
		}
	case "name":
		if has("name", "compound", "component", "analyte", "substance") {
			return 2
		}
	}
	return 0
}

// unitOf reads "min" or "s" from a header cell's words, "" when it gives
// none.
func unitOf(h string) string {
	words := strings.FieldsFunc(strings.ToLower(h), func(r rune) bool {
		return !(r >= 'a' && r <= 'z')
	})
	for _, w := range words {
		switch w {
		case "min", "mins", "minute", "minutes":
			return "min"
		case "s", "sec", "secs", "second", "seconds":
			return "s"
		}
	}
	return ""
}

func widthKind(h string) string {
	h = norm(h)
	switch {
	case strings.Contains(h, "sigma") || strings.Contains(h, "std"):
		return "sigma"
	case strings.Contains(h, "base") || strings.Contains(h, "tangent"):
		return "base"
	}
	return "half-height"
}

func isIndex(s string) bool {
	_, err := strconv.Atoi(s)
	return err == nil
}

func indexOf(cells []string, s string) int {
	for k, c := range cells {
		if norm(c) == norm(s) {
			return k
		}
	}
	return -1
}

func cellAt(cells []string, k int) string {
	if k < len(cells) {
		return cells[k]
	}
	return ""
}

func headerName(h []string, k int) string {
	if k < len(h) {
		return fmt.Sprintf(" (%q)", h[k])
	}
	return ""
}

func fieldName(h []string, k int, role string) string {
	if k < len(h) && h[k] != "" {
		return fmt.Sprintf("column %d %q", k+1, h[k])
	}
	return fmt.Sprintf("column %d (%s)", k+1, role)
}

// guessTimeColumn, without a header: the numeric column whose values rise
// through the table and are not all whole numbers (a peak number is).
func guessTimeColumn(body []line, width int, num func(string) (float64, bool)) (int, error) {
	var cands []int
	for k := 0; k < width; k++ {
		n, rising, whole := 0, true, true
		prev := math.Inf(-1)
		for _, l := range body {
			if k >= len(l.cells) {
				continue
			}
			x, ok := num(l.cells[k])
			if !ok {
				continue
			}
			n++
			if x < prev {
				rising = false
			}
			if x != math.Trunc(x) {
				whole = false
			}
			prev = x
		}
		if n >= max(1, len(body)*3/4) && rising && (!whole || n == 1) {
			cands = append(cands, k)
		}
	}
	switch len(cands) {
	case 0:
		return -1, errors.New("no header names the retention time and no column of rising decimal numbers was found")
	case 1:
		return cands[0], nil
	}
	return -1, fmt.Errorf("no header names the retention time and columns %d and %d could both be it", cands[0]+1, cands[1]+1)
}

func guessNameColumn(body []line, width int, num func(string) (float64, bool)) int {
	for k := 0; k < width; k++ {
		text := 0
		for _, l := range body {
			if k < len(l.cells) && l.cells[k] != "" {
				if _, ok := num(l.cells[k]); !ok {
					text++
				}
			}
		}
		if text > 0 && text >= len(body)/2 {
			return k
		}
	}
	return -1
}
