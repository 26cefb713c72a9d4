package methodfile

import (
	"bytes"
	"fmt"
	"hash/fnv"
	"sort"
	"strings"

	"github.com/pelletier/go-toml/v2"
	"github.com/pelletier/go-toml/v2/unstable"
)

// Saving keeps the user's file. Update writes a method over the text of the
// file it came from, changing only what differs: a changed value is replaced
// where it stands (its quoting, the comment after it and the line's layout
// kept), a key that became default-free is added to the end of its own
// table, a key the method no longer has is removed with its line, an added
// compound or ramp is inserted after its neighbours and a removed one is
// removed with the comment lines directly above it. Everything else (comments,
// blank lines, key order, number spelling) stays byte for byte.
//
// How: the original text is parsed into the method it means, and that
// method is written by Marshal (A); the new method is written by Marshal too
// (B). A and B are in one canonical layout, so comparing them key by key
// gives exactly what changed; each change is then placed in the original
// text at the position go-toml's unstable parser reports. The result is
// parsed again and must write out exactly as B; if it does not (a layout
// the placer does not handle, such as inline tables), Update falls back to
// B itself and says so.

// Update returns the text of m written over orig (the file's current text,
// name used in messages). inPlace is false when orig could not be kept (it
// is not a valid method, or its layout defeated the placer) and the result
// is a fresh Marshal of m.
func Update(name string, orig []byte, m *Method) (data []byte, inPlace bool, err error) {
	b, err := Marshal(m)
	if err != nil {
		return nil, false, err
	}
	if len(orig) == 0 {
		return b, false, nil
	}
	body, bom := orig, []byte(nil)
	if bytes.HasPrefix(body, utf8BOM) {
		body, bom = body[len(utf8BOM):], utf8BOM
	}
	old, err := Parse(name, body)
	if err != nil {
		return b, false, nil
	}
	a, err := Marshal(old)
	if err != nil {
		return b, false, nil
	}
	if bytes.Equal(a, b) {
		return orig, true, nil
	}
	out, ok := patch(body, a, b)
	if !ok {
		return b, false, nil
	}
	// The placed text must mean exactly the new method.
	got, err := Parse(name, out)
	if err != nil {
		return b, false, nil
	}
	if again, err := Marshal(got); err != nil || !bytes.Equal(again, b) {
		return b, false, nil
	}
	if bom != nil {
		out = append(append([]byte{}, bom...), out...)
	}
	return out, true, nil
}

var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// tkv is one key = value line of a document.
type tkv struct {
	rel              string // key relative to its table (dotted if dotted)
	lineStart        int    // start of the line the key is on
	valStart, valEnd int    // the value's bytes
	lineEnd          int    // just after the newline ending the value's line
}

// ttable is one table (or array-of-tables element, or the root) of a
// document with the byte ranges of its parts.
type ttable struct {
	path        string // canonical: "", "column", "oven.ramp[2]", "compound[7]"
	base        string // array name for an element ("compound"), else ""
	headerStart int    // start of the header line; -1 for the root
	headerEnd   int    // just after the header line
	regionStart int    // headerStart less the comment lines right above it
	regionEnd   int    // the next table's regionStart, or the end
	kvs         []*tkv
	byRel       map[string]*tkv
	order       int
}

// removal is the byte range removing t takes out: the comment lines right
// above its header, the header, its keys and the blank lines after them;
// comment lines after a blank line stay (they may be about what follows).
func (t *ttable) removal(data []byte) (int, int) {
	end := t.insertAt()
	for end < t.regionEnd {
		le := lineEndOf(data, end)
		if len(bytes.TrimSpace(data[end:le])) != 0 {
			break
		}
		end = le
	}
	return t.regionStart, end
}

// hasFolded reports whether t has a key spelled like rel but for case.
func (t *ttable) hasFolded(rel string) bool {
	for _, kv := range t.kvs {
		if kv.rel != rel && strings.EqualFold(kv.rel, rel) {
			return true
		}
	}
	return false
}

// insertAt is where a new key of t goes: after its last key's line, or
// after the header.
func (t *ttable) insertAt() int {
	if len(t.kvs) > 0 {
		return t.kvs[len(t.kvs)-1].lineEnd
	}
	if t.headerStart < 0 {
		return 0
	}
	return t.headerEnd
}

type tdoc struct {
	data   []byte
	tables []*ttable // in file order, root first
	byPath map[string]*ttable
	arrays map[string][]*ttable // elements of each array of tables, in order
}

func lineStartOf(data []byte, off int) int {
	return bytes.LastIndexByte(data[:off], '\n') + 1
}

func lineEndOf(data []byte, off int) int {
	if i := bytes.IndexByte(data[off:], '\n'); i >= 0 {
		return off + i + 1
	}
	return len(data)
}

// scan maps a TOML document's tables and keys to byte ranges. ok is false on
// a syntax error or a layout scan does not model (an array of tables inside
// an element of another).
func scan(data []byte) (*tdoc, bool) {
	d := &tdoc{data: data, byPath: map[string]*ttable{}, arrays: map[string][]*ttable{}}
	root := &ttable{path: "", headerStart: -1, byRel: map[string]*tkv{}}
	d.tables = append(d.tables, root)
	d.byPath[""] = root
	cur := root
	var p unstable.Parser
	p.Reset(data)
	counts := map[string]int{}
	keyOf := func(n *unstable.Node) (parts []string, first, last unstable.Range) {
		it := n.Key()
		i := 0
		for it.Next() {
			k := it.Node()
			parts = append(parts, string(k.Data))
			if i == 0 {
				first = k.Raw
			}
			last = k.Raw
			i++
		}
		return
	}
	canon := func(parts []string, arrayHeader bool) string { return canonPath(parts, counts, arrayHeader) }
	for p.NextExpression() {
		e := p.Expression()
		switch e.Kind {
		case unstable.Table, unstable.ArrayTable:
			parts, first, last := keyOf(e)
			start := lineStartOf(data, int(first.Offset))
			t := &ttable{headerStart: start, headerEnd: lineEndOf(data, int(last.Offset+last.Length)), byRel: map[string]*tkv{}, order: len(d.tables)}
			if e.Kind == unstable.Table {
				t.path = canon(parts, false)
			} else {
				t.base = canon(parts, true)
				counts[t.base]++
				t.path = fmt.Sprintf("%s[%d]", t.base, counts[t.base])
				d.arrays[t.base] = append(d.arrays[t.base], t)
			}
			if _, dup := d.byPath[t.path]; dup {
				return nil, false
			}
			// Comment lines directly above the header belong to it, but
			// never reach back into the previous table's last value.
			floor := cur.headerEnd
			if len(cur.kvs) > 0 {
				floor = cur.kvs[len(cur.kvs)-1].lineEnd
			}
			if cur.headerStart < 0 && len(cur.kvs) == 0 {
				floor = 0
			}
			rs := start
			for rs > floor {
				ps := lineStartOf(data, rs-1)
				if !bytes.HasPrefix(bytes.TrimLeft(data[ps:rs], " \t"), []byte("#")) {
					break
				}
				rs = ps
			}
			t.regionStart = rs
			d.tables = append(d.tables, t)
			d.byPath[t.path] = t
			cur = t
		case unstable.KeyValue:
			parts, first, last := keyOf(e)
			kvEnd := int(e.Raw.Offset + e.Raw.Length)
			eq := bytes.IndexByte(data[last.Offset+last.Length:kvEnd], '=')
			if eq < 0 {
				return nil, false
			}
			vs := int(last.Offset+last.Length) + eq + 1
			for vs < kvEnd && (data[vs] == ' ' || data[vs] == '\t') {
				vs++
			}
			kv := &tkv{rel: strings.Join(parts, "."), lineStart: lineStartOf(data, int(first.Offset)), valStart: vs, valEnd: kvEnd, lineEnd: lineEndOf(data, kvEnd)}
			cur.kvs = append(cur.kvs, kv)
			cur.byRel[kv.rel] = kv
		}
	}
	if p.Error() != nil {
		return nil, false
	}
	for i, t := range d.tables {
		if i+1 < len(d.tables) {
			t.regionEnd = d.tables[i+1].regionStart
		} else {
			t.regionEnd = len(data)
		}
	}
	root.regionEnd = len(data)
	if len(d.tables) > 1 {
		root.regionEnd = d.tables[1].regionStart
	}
	return d, true
}

func (d *tdoc) val(t *ttable, rel string) (string, bool) {
	kv, ok := t.byRel[rel]
	if !ok {
		return "", false
	}
	return string(d.data[kv.valStart:kv.valEnd]), true
}

// signature is a hash of an element's keys and values, for matching
// elements of an array between two canonical documents.
func (d *tdoc) signature(t *ttable) uint64 {
	h := fnv.New64a()
	h.Write(d.data[t.headerEnd:t.regionEnd])
	return h.Sum64()
}

type edit struct {
	start, end int
	text       string
	seq        int
}

type patcher struct {
	o, a, b *tdoc
	edits   []edit
	eol     string
	pairs   map[string][]pair   // element matching of each array
	bToA    map[*ttable]*ttable // B element -> the A element it edits
}

func (p *patcher) add(start, end int, text string) {
	if p.eol != "\n" {
		text = strings.ReplaceAll(text, "\n", p.eol)
	}
	p.edits = append(p.edits, edit{start, end, text, len(p.edits)})
}

// patch places the differences between canonical texts a (the original's
// meaning) and b (the new method) into the original text orig.
func patch(orig, a, b []byte) ([]byte, bool) {
	o, ok1 := scan(orig)
	da, ok2 := scan(a)
	db, ok3 := scan(b)
	if !ok1 || !ok2 || !ok3 {
		return nil, false
	}
	p := &patcher{o: o, a: da, b: db, eol: "\n"}
	if bytes.Contains(orig, []byte("\r\n")) {
		p.eol = "\r\n"
	}
	// Each element of an array in A is the element of the same number in
	// the original (A is the original read and written again).
	for base, els := range da.arrays {
		if len(o.arrays[base]) != len(els) {
			return nil, false
		}
	}
	// Arrays of tables: match elements first (placing a new plain table
	// needs to know which original element follows it).
	bases := map[string]bool{}
	for base := range da.arrays {
		bases[base] = true
	}
	for base := range db.arrays {
		bases[base] = true
	}
	names := make([]string, 0, len(bases))
	for base := range bases {
		names = append(names, base)
	}
	sort.Strings(names)
	p.pairs = map[string][]pair{}
	p.bToA = map[*ttable]*ttable{}
	for _, base := range names {
		as, bs := da.arrays[base], db.arrays[base]
		prs := matchElements(da, db, as, bs)
		p.pairs[base] = prs
		for _, pr := range prs {
			if pr.a >= 0 && pr.b >= 0 {
				p.bToA[bs[pr.b]] = as[pr.a]
			}
		}
	}
	// Plain tables (and the root), in B's order, then the ones B dropped.
	for _, bt := range db.tables {
		if bt.base != "" {
			continue
		}
		at := da.byPath[bt.path]
		ot := o.byPath[bt.path]
		if !p.table(at, bt, ot, bt) {
			return nil, false
		}
	}
	for _, at := range da.tables {
		if at.base == "" && db.byPath[at.path] == nil {
			if ot := o.byPath[at.path]; ot != nil {
				s, e := ot.removal(o.data)
				p.add(s, e, "")
			}
		}
	}
	// Arrays of tables: edit, insert and remove elements.
	for _, base := range names {
		if !p.array(base) {
			return nil, false
		}
	}
	return p.apply(orig), true
}

// table edits the original's table ot (nil when the file does not have it)
// from A's at (nil when absent) to B's bt. where is the B table used to find
// a place for a new table.
func (p *patcher) table(at, bt, ot *ttable, where *ttable) bool {
	tpath := bt.path
	if at != nil {
		tpath = at.path
	}
	var added strings.Builder
	for _, bk := range bt.kvs {
		bv, _ := p.b.val(bt, bk.rel)
		if at != nil {
			if av, ok := p.a.val(at, bk.rel); ok && av == bv {
				continue
			}
		}
		if okv := p.okv(ot, tpath, bk.rel); okv != nil {
			p.add(okv.valStart, okv.valEnd, keepSpelling(string(p.o.data[okv.valStart:okv.valEnd]), bv, p.eol != "\n"))
			continue
		}
		if ot != nil && ot.hasFolded(bk.rel) {
			return false // never a second spelling of a key beside the file's
		}
		added.WriteString(string(p.b.data[bk.lineStart:bk.lineEnd]))
	}
	if at != nil {
		for _, ak := range at.kvs {
			if _, ok := bt.byRel[ak.rel]; ok {
				continue
			}
			if okv := p.okv(ot, tpath, ak.rel); okv != nil {
				p.add(okv.lineStart, okv.lineEnd, "")
			}
		}
	}
	if added.Len() == 0 {
		return true
	}
	text := added.String()
	if ot != nil {
		at := ot.insertAt()
		if at > 0 && p.o.data[at-1] != '\n' {
			text = "\n" + text
		}
		p.add(at, at, text)
		return true
	}
	// The file writes this table as dotted keys in an enclosing one
	// (goal.ramps = 2 at the top): new keys join them, dotted the same way.
	if anc, prefix, last := p.dottedHome(tpath); anc != nil {
		var b strings.Builder
		for _, l := range strings.SplitAfter(text, "\n") {
			if l != "" {
				b.WriteString(prefix + l)
			}
		}
		p.add(last.lineEnd, last.lineEnd, b.String())
		return true
	}
	// A table the file does not have: its header and keys, placed before
	// the first table that follows it in B and exists in the file.
	hdr := string(p.b.data[where.headerStart:where.headerEnd])
	p.insertTable(where, hdr+text+"\n")
	return true
}

// okv finds the original's key rel of the table at tpath: in that table
// (ot), or written as a dotted key in an enclosing table.
func (p *patcher) okv(ot *ttable, tpath, rel string) *tkv {
	if ot != nil {
		if kv, ok := ot.byRel[rel]; ok {
			return kv
		}
	}
	if strings.ContainsRune(tpath, '[') {
		return nil
	}
	// Enclosing tables from the nearest out, the top level last.
	for i := strings.LastIndexByte(tpath, '.'); ; i = strings.LastIndexByte(tpath[:i], '.') {
		anc, rest := "", tpath
		if i >= 0 {
			anc, rest = tpath[:i], tpath[i+1:]
		}
		if t := p.o.byPath[anc]; t != nil {
			if kv, ok := t.byRel[rest+"."+rel]; ok {
				return kv
			}
		}
		if i < 0 {
			return nil
		}
	}
}

// dottedHome finds an enclosing table of the original in which the table
// at tpath is written as dotted keys: that table, the key prefix
// ("goal."), and the last such key.
func (p *patcher) dottedHome(tpath string) (*ttable, string, *tkv) {
	if strings.ContainsRune(tpath, '[') {
		return nil, "", nil
	}
	for _, t := range p.o.tables {
		if t.base != "" || (t.path != "" && !strings.HasPrefix(tpath, t.path+".")) {
			continue
		}
		prefix := strings.TrimPrefix(tpath, t.path)
		prefix = strings.TrimPrefix(prefix, ".") + "."
		var last *tkv
		for _, kv := range t.kvs {
			if strings.HasPrefix(kv.rel, prefix) {
				last = kv
			}
		}
		if last != nil {
			return t, prefix, last
		}
	}
	return nil, "", nil
}

// insertTable places a whole new table's text before the original's region
// of the first table after bt (in B's order) that the original has, or at
// the end.
func (p *patcher) insertTable(bt *ttable, text string) {
	// A subtable ([goal.robust], [[limits.rate_band]]) goes right after its
	// parent's keys when the file has the parent.
	name := bt.path
	if bt.base != "" {
		name = bt.base
	}
	if i := strings.LastIndexByte(name, '.'); i > 0 {
		if op := p.o.byPath[name[:i]]; op != nil && op.headerStart >= 0 {
			at := op.insertAt()
			lead := "\n"
			if at > 0 && p.o.data[at-1] != '\n' {
				lead = "\n\n"
			}
			p.add(at, at, lead+strings.TrimRight(text, "\n")+"\n")
			return
		}
	}
	for _, next := range p.b.tables[bt.order+1:] {
		if ot := p.o.byPath[p.origPath(next)]; ot != nil {
			p.add(ot.regionStart, ot.regionStart, text)
			return
		}
	}
	end := len(p.o.data)
	switch {
	case end == 0:
	case p.o.data[end-1] != '\n':
		text = "\n\n" + text
	case end < 2 || p.o.data[end-2] != '\n':
		text = "\n" + text
	}
	p.add(end, end, text)
}

// origPath maps a B table to the original's path: the same for plain
// tables; for array elements, through the element matching (set by array).
func (p *patcher) origPath(bt *ttable) string {
	if bt.base == "" {
		return bt.path
	}
	if m, ok := p.bToA[bt]; ok {
		return m.path
	}
	return "\x00" // an element the original does not have
}

// array matches A's and B's elements of one array by a longest common
// subsequence of their contents (so that a removed compound is removed, not
// every later one shifted), pairs what is left between matches by position
// (an edited element), and then edits, inserts and removes.
func (p *patcher) array(base string) bool {
	as, bs := p.a.arrays[base], p.b.arrays[base]
	os := p.o.arrays[base]
	pairs := p.pairs[base]
	// An inserted element goes after the last original element passed so
	// far (prev), or before the first original element.
	var prev *ttable
	for _, pr := range pairs {
		switch {
		case pr.a >= 0 && pr.b >= 0:
			if !p.table(as[pr.a], bs[pr.b], os[pr.a], bs[pr.b]) {
				return false
			}
			prev = os[pr.a]
		case pr.a >= 0:
			s, e := os[pr.a].removal(p.o.data)
			p.add(s, e, "")
			prev = os[pr.a]
		default:
			bt := bs[pr.b]
			text := strings.TrimRight(string(p.b.data[bt.headerStart:bt.regionEnd]), "\n") + "\n"
			switch {
			case prev != nil:
				at := prev.insertAt()
				if at > 0 && p.o.data[at-1] != '\n' {
					text = "\n" + text
				}
				p.add(at, at, "\n"+text)
			case len(os) > 0:
				p.add(os[0].regionStart, os[0].regionStart, text+"\n")
			default:
				p.insertTable(bt, text+"\n")
			}
		}
	}
	return true
}

type pair struct{ a, b int }

// matchElements pairs elements of A (as) and B (bs): common prefix and
// suffix first, then a longest common subsequence of the middle by content
// (when small enough), with unmatched runs paired by position. -1 marks an
// element only one side has. Pairs come in order of both sides.
func matchElements(da, db *tdoc, as, bs []*ttable) []pair {
	sa := make([]uint64, len(as))
	for i, t := range as {
		sa[i] = da.signature(t)
	}
	sb := make([]uint64, len(bs))
	for i, t := range bs {
		sb[i] = db.signature(t)
	}
	pre := 0
	for pre < len(sa) && pre < len(sb) && sa[pre] == sb[pre] {
		pre++
	}
	suf := 0
	for suf < len(sa)-pre && suf < len(sb)-pre && sa[len(sa)-1-suf] == sb[len(sb)-1-suf] {
		suf++
	}
	var out []pair
	for i := 0; i < pre; i++ {
		out = append(out, pair{i, i})
	}
	ma, mb := sa[pre:len(sa)-suf], sb[pre:len(sb)-suf]
	var anchors []pair // matched middle pairs, relative to the middle
	if len(ma) > 0 && len(mb) > 0 && len(ma)*len(mb) <= 1<<20 {
		anchors = lcs(ma, mb)
	}
	ia, ib := 0, 0
	gap := func(ea, eb int) {
		for ia < ea && ib < eb {
			out = append(out, pair{pre + ia, pre + ib})
			ia++
			ib++
		}
		for ; ia < ea; ia++ {
			out = append(out, pair{pre + ia, -1})
		}
		for ; ib < eb; ib++ {
			out = append(out, pair{-1, pre + ib})
		}
	}
	for _, an := range anchors {
		gap(an.a, an.b)
		out = append(out, pair{pre + an.a, pre + an.b})
		ia, ib = an.a+1, an.b+1
	}
	gap(len(ma), len(mb))
	for i := 0; i < suf; i++ {
		out = append(out, pair{len(sa) - suf + i, len(sb) - suf + i})
	}
	return out
}

func lcs(x, y []uint64) []pair {
	n, m := len(x), len(y)
	dp := make([]int32, (n+1)*(m+1))
	at := func(i, j int) *int32 { return &dp[i*(m+1)+j] }
	for i := n - 1; i >= 0; i-- {
		for j := m - 1; j >= 0; j-- {
			if x[i] == y[j] {
				*at(i, j) = *at(i+1, j+1) + 1
			} else if *at(i+1, j) >= *at(i, j+1) {
				*at(i, j) = *at(i+1, j)
			} else {
				*at(i, j) = *at(i, j+1)
			}
		}
	}
	var out []pair
	for i, j := 0, 0; i < n && j < m; {
		switch {
		case x[i] == y[j]:
			out = append(out, pair{i, j})
			i++
			j++
		case *at(i+1, j) >= *at(i, j+1):
			i++
		default:
			j++
		}
	}
	return out
}

func (p *patcher) apply(orig []byte) []byte {
	sort.SliceStable(p.edits, func(i, j int) bool {
		ei, ej := p.edits[i], p.edits[j]
		if ei.start != ej.start {
			return ei.start < ej.start
		}
		// At one offset: insertions before the removal that starts there.
		if (ei.end == ei.start) != (ej.end == ej.start) {
			return ei.end == ei.start
		}
		return ei.seq < ej.seq
	})
	var out bytes.Buffer
	pos := 0
	for _, e := range p.edits {
		if e.start < pos {
			// Overlap: a removal inside a removed region; skip what is gone.
			if e.end <= pos {
				if e.end == e.start && e.text != "" {
					out.WriteString(e.text)
				}
				continue
			}
			e.start = pos
		}
		out.Write(orig[pos:e.start])
		out.WriteString(e.text)
		pos = e.end
	}
	out.Write(orig[pos:])
	return out.Bytes()
}

// keepSpelling writes a new number the way the file wrote the old one where
// that means the same: a whole number stays without ".0" if the file wrote
// it so (30, not 30.0).
func keepSpelling(old, new string, crlf bool) string {
	if strings.HasSuffix(new, ".0") && old != "" && strings.Trim(old, "+-0123456789_") == "" {
		return strings.TrimSuffix(new, ".0")
	}
	return keepQuotes(old, new, crlf)
}

// keepQuotes writes a new string value (or an array of strings) in the
// quote style of the value it replaces, wherever the new text can be
// written so: gas = "helium" becomes gas = "hydrogen", not 'hydrogen'. The
// styles are basic ("..."), literal ('...') and their multi-line forms
// (three quotes of either kind). A value the old style cannot hold keeps the new
// text as it is. In a file with CRLF line ends a multi-line string gets
// no raw newline (the file's line end would become part of the value).
func keepQuotes(old, new string, crlf bool) string {
	style := quoteStyle(old)
	if style == "" || !strings.ContainsAny(new, `"'`) {
		return new
	}
	if !strings.HasPrefix(new, "[") {
		s, ok := decodeString(new)
		if !ok {
			return new
		}
		if out, ok := quoteAs(s, style, strings.HasPrefix(old, style+"\n") || strings.HasPrefix(old, style+"\r\n"), crlf); ok {
			return out
		}
		return new
	}
	if len(style) == 3 {
		return new // an array of multi-line strings: left as written
	}
	// An array: each string element in the old style.
	var b strings.Builder
	for i := 0; i < len(new); {
		c := new[i]
		if c != '"' && c != '\'' {
			b.WriteByte(c)
			i++
			continue
		}
		end := stringEnd(new, i)
		if end < 0 {
			return new
		}
		tok := new[i:end]
		if s, ok := decodeString(tok); ok {
			if out, ok := quoteAs(s, style, false, crlf); ok {
				tok = out
			}
		}
		b.WriteString(tok)
		i = end
	}
	return b.String()
}

// quoteStyle is the opening quote of the first string in a value ("" when
// it has none before anything else).
func quoteStyle(v string) string {
	v = strings.TrimLeft(v, "[ \t")
	for _, q := range []string{`"""`, "'''", `"`, "'"} {
		if strings.HasPrefix(v, q) {
			return q
		}
	}
	return ""
}

// stringEnd is the end of the single-line string starting at s[i], or -1.
func stringEnd(s string, i int) int {
	q := s[i]
	for j := i + 1; j < len(s); j++ {
		switch {
		case q == '"' && s[j] == '\\':
			j++
		case s[j] == q:
			return j + 1
		}
	}
	return -1
}

// decodeString reads one TOML string value.
func decodeString(v string) (string, bool) {
	var x struct{ V string }
	if err := toml.Unmarshal([]byte("V = "+v), &x); err != nil {
		return "", false
	}
	return x.V, true
}

// quoteAs writes s in the quote style q when it can hold s exactly; lead
// puts a newline after a multi-line string's opening quotes (as the file
// did; it is not part of the value).
func quoteAs(s, q string, lead, crlf bool) (string, bool) {
	var body string
	switch q {
	case `"`, `"""`:
		var b strings.Builder
		for _, r := range s {
			switch {
			case r == '"' || r == '\\':
				b.WriteByte('\\')
				b.WriteRune(r)
			case r == '\n' && q == `"""` && !crlf:
				b.WriteRune(r)
			case r == '\n':
				b.WriteString(`\n`)
			case r == '\t':
				b.WriteString(`\t`)
			case r < 0x20 || r == 0x7f:
				fmt.Fprintf(&b, `\u%04X`, r)
			default:
				b.WriteRune(r)
			}
		}
		body = b.String()
	default:
		for _, r := range s {
			if r == '\'' || (r < 0x20 && r != '\t' && !(r == '\n' && len(q) == 3 && !crlf)) || r == 0x7f {
				return "", false
			}
		}
		body = s
	}
	if len(q) == 3 && (lead || strings.HasPrefix(s, "\n")) {
		body = "\n" + body
	}
	out := q + body + q
	if got, ok := decodeString(out); !ok || got != s {
		return "", false
	}
	return out, true
}
