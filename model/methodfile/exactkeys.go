package methodfile

import (
	"fmt"
	"reflect"
	"strings"

	"github.com/pelletier/go-toml/v2/unstable"
)

// go-toml matches keys to fields regardless of case (dh_kj_mol fills
// dH_kJ_mol), and an unknown-key check that folds case lets a second
// spelling of a key through. checkExactKeys walks the document and refuses
// every key whose spelling is not the format's exact name, suggesting the
// right one.

// checkExactKeys reports the first key of data (a TOML document decoding
// into target's type) that matches a field only when case is ignored. It
// stops quietly at a syntax error (the decoder reports that one).
func checkExactKeys(name string, data []byte, target any) error {
	root := reflect.TypeOf(target)
	lineOf := lineTable(data)
	var p unstable.Parser
	p.Reset(data)
	table := root
	tablePath := ""
	counts := map[string]int{} // element count of each array of tables, by canonical path
	// canon is the path as locate numbers it (see canonPath).
	canon := func(parts []keyPart, arrayHeader bool) string {
		keys := make([]string, len(parts))
		for i, part := range parts {
			keys[i] = part.key
		}
		return canonPath(keys, counts, arrayHeader)
	}
	for p.NextExpression() {
		e := p.Expression()
		switch e.Kind {
		case unstable.Table, unstable.ArrayTable:
			parts := keyParts(e.Key(), lineOf)
			array := e.Kind == unstable.ArrayTable
			t, bad, folded := walkKey(root, parts, array)
			if bad >= 0 {
				return &Error{File: name, Line: parts[bad].line, Key: canon(parts[:bad+1], false), Msg: fmt.Sprintf("unknown key (did you mean %s?)", folded)}
			}
			table, tablePath = t, canon(parts, array)
			if array {
				counts[tablePath]++
				tablePath = fmt.Sprintf("%s[%d]", tablePath, counts[tablePath])
			}
		case unstable.KeyValue:
			if table == nil {
				continue // inside a table whose shape is not checked
			}
			if err := checkKeyValue(name, table, tablePath, e, lineOf); err != nil {
				return err
			}
		}
	}
	return nil
}

type keyPart struct {
	key  string
	line int
}

func keyParts(it unstable.Iterator, lineOf func(int) int) []keyPart {
	var parts []keyPart
	for it.Next() {
		k := it.Node()
		parts = append(parts, keyPart{string(k.Data), lineOf(int(k.Raw.Offset))})
	}
	return parts
}

// checkKeyValue checks the key of kv (in a table of type t at path) and the
// keys of the inline tables in its value.
func checkKeyValue(name string, t reflect.Type, path string, kv *unstable.Node, lineOf func(int) int) error {
	parts := keyParts(kv.Key(), lineOf)
	nt, bad, folded := walkKey(t, parts, false)
	if bad >= 0 {
		k := path
		for _, part := range parts[:bad+1] {
			k = joinKey(k, part.key)
		}
		return &Error{File: name, Line: parts[bad].line, Key: k, Msg: fmt.Sprintf("unknown key (did you mean %s?)", folded)}
	}
	for _, part := range parts {
		path = joinKey(path, part.key)
	}
	return checkValue(name, nt, path, kv.Value(), lineOf)
}

// elem strips pointers, and slices when inArray.
func elem(t reflect.Type, inArray bool) reflect.Type {
	for t != nil && (t.Kind() == reflect.Pointer || (inArray && t.Kind() == reflect.Slice)) {
		t = t.Elem()
	}
	return t
}

// field resolves one key in the type t: the type it leads to (nil when it is
// not checked further: an unknown key, which the decoder reports, or a
// value of any shape), or the exact name of a field the key matches only
// when case is ignored.
func field(t reflect.Type, key string) (next reflect.Type, folded string) {
	t = elem(t, false)
	if t == nil {
		return nil, ""
	}
	switch t.Kind() {
	case reflect.Map:
		return t.Elem(), ""
	case reflect.Struct:
	default:
		return nil, ""
	}
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		tag, _, _ := strings.Cut(f.Tag.Get("toml"), ",")
		if tag == "" || tag == "-" {
			continue
		}
		if tag == key {
			return f.Type, ""
		}
		if strings.EqualFold(tag, key) {
			folded = tag
		}
	}
	return nil, folded
}

func joinKey(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// walkKey follows the parts of a (possibly dotted) key from t: the type it
// leads to (for an array-of-tables header, the element type), or the index
// of the part spelled other than its field (bad >= 0) and the field's name.
func walkKey(t reflect.Type, parts []keyPart, arrayHeader bool) (next reflect.Type, bad int, folded string) {
	for i, part := range parts {
		nt, f := field(elem(t, true), part.key)
		if f != "" {
			return nil, i, f
		}
		if nt == nil {
			return nil, -1, ""
		}
		t = nt
	}
	if arrayHeader {
		t = elem(t, true)
	}
	return t, -1, ""
}

// checkValue checks the keys of inline tables (and arrays of them) in a
// value of type t.
func checkValue(name string, t reflect.Type, path string, v *unstable.Node, lineOf func(int) int) error {
	if t == nil || v == nil {
		return nil
	}
	switch v.Kind {
	case unstable.InlineTable:
		it := v.Children()
		for it.Next() {
			if err := checkKeyValue(name, t, path, it.Node(), lineOf); err != nil {
				return err
			}
		}
	case unstable.Array:
		et := elem(t, false)
		if et == nil || et.Kind() != reflect.Slice {
			return nil
		}
		it := v.Children()
		for it.Next() {
			if err := checkValue(name, et.Elem(), path, it.Node(), lineOf); err != nil {
				return err
			}
		}
	}
	return nil
}

// suggestKey is the format's name closest to an unknown key (path: the
// decoder's key parts, the unknown one last) within two edits, or "".
func suggestKey(target any, path []string) string {
	if len(path) == 0 {
		return ""
	}
	t := reflect.TypeOf(target)
	for _, part := range path[:len(path)-1] {
		nt, _ := field(elem(t, true), part)
		if nt == nil {
			return ""
		}
		t = nt
	}
	t = elem(t, true)
	if t == nil || t.Kind() != reflect.Struct {
		return ""
	}
	key := strings.ToLower(path[len(path)-1])
	best, bestD := "", 3
	for i := 0; i < t.NumField(); i++ {
		tag, _, _ := strings.Cut(t.Field(i).Tag.Get("toml"), ",")
		if tag == "" || tag == "-" {
			continue
		}
		if d := editDistance(key, strings.ToLower(tag)); d < bestD {
			best, bestD = tag, d
		}
	}
	return best
}

// editDistance is the Levenshtein distance of a and b (bytes).
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := prev[j-1]
			if a[i-1] != b[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
