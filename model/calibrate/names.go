package calibrate

import (
	"fmt"
	"sort"
	"strings"

	"github.com/rampwise/rampwise/model/methodfile"
)

// editDistance is the Levenshtein distance (insertions, deletions and
// substitutions of one character each cost 1), on runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := prev[j-1]
			if ra[i-1] != rb[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

func normName(s string) string { return strings.ToLower(strings.Join(strings.Fields(s), " ")) }

// Nearest is the method's compound name closest to name by edit distance
// (case and spacing ignored), and that distance.
func Nearest(m *methodfile.Method, name string) (string, int) {
	best, bd := "", 1<<30
	n := normName(name)
	for _, c := range m.Compounds {
		if d := editDistance(n, normName(c.Name)); d < bd || d == bd && c.Name < best {
			best, bd = c.Name, d
		}
	}
	return best, bd
}

// likelyTypo: one edit away (two for names of ten characters or more).
// Homologues differ by more (hexanal, octanal, decanal); a pair like
// ethanol/methanol is one edit apart, so a name is never taken for a
// misspelling of a compound measured in the same run.
func likelyTypo(name string, d int) bool {
	return d == 1 || d == 2 && len([]rune(name)) >= 10
}

// checkNames looks at every name the runs give that the method lacks. A
// name equal to a method name but for case and spacing is taken as that
// compound. A name within a couple of edits of a method name is taken for a
// misspelling: in a peak table it becomes an unnamed peak (assigned by
// retention), in [run.retention_min] it is left out; Options.AddUnknown
// keeps it instead. Other names stay and are added as non-targets when
// fitted (never as targets).
//
// purpose words what a left-out name is left out of ("the fit", "the
// comparison"); each run is named with the file and line of the name.
func checkNames(m *methodfile.Method, runs *methodfile.Runs, opt Options, purpose string) []string {
	type note struct {
		runs []string
		what string
	}
	notes := map[string]*note{}
	add := func(key, run, what string) {
		n := notes[key]
		if n == nil {
			n = &note{what: what}
			notes[key] = n
		}
		n.runs = append(n.runs, run)
	}
	where := func(r *methodfile.Run, name string) string {
		q := fmt.Sprintf("%q", r.Name)
		if w := r.NameWhere(name); w != "" {
			q += " (" + w + ")"
		}
		return q
	}
	for ri := range runs.Runs {
		r := &runs.Runs[ri]
		for _, name := range append([]string(nil), r.Names()...) {
			rn := where(r, name)
			if compoundIndex(m, name) >= 0 {
				continue
			}
			near, d := Nearest(m, name)
			t, w := r.Retention[name], r.Widths[name]
			if _, both := r.Retention[near]; both && d > 0 {
				continue
			}
			switch {
			case near != "" && d == 0:
				if _, dup := r.Retention[near]; dup {
					add(name, rn, fmt.Sprintf("%q is not in the method and %q is measured too; left out", name, near))
					r.DeleteRetention(name)
					continue
				}
				r.DeleteRetention(name)
				r.SetRetention(near, t, w)
				renamePeak(r, name, near)
				add(name, rn, fmt.Sprintf("%q taken as the method's %q", name, near))
			case near != "" && likelyTypo(name, d) && !opt.AddUnknown:
				r.DeleteRetention(name)
				if r.Source != "" {
					renamePeak(r, name, "")
					add(name, rn, fmt.Sprintf("%q is not in the method; did you mean %q? treated as an unnamed peak and assigned by retention (correct the name, or give --add-unknown to add it as a non-target)", name, near))
				} else {
					add(name, rn, fmt.Sprintf("%q is not in the method; did you mean %q? left out of "+purpose+" (correct the name, or give --add-unknown to add it as a non-target)", name, near))
				}
			case near != "" && likelyTypo(name, d):
				add(name, rn, fmt.Sprintf("%q is not in the method (nearest %q); kept as a separate compound as --add-unknown asks: added as a non-target when seen in two runs", name, near))
			}
		}
	}
	keys := make([]string, 0, len(notes))
	for k := range notes {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var out []string
	for _, k := range keys {
		n := notes[k]
		out = append(out, fmt.Sprintf("%s %s: %s", plural(len(n.runs), "run", "runs"), strings.Join(n.runs, ", "), n.what))
	}
	return out
}

func renamePeak(r *methodfile.Run, from, to string) {
	for i := range r.Peaks {
		if r.Peaks[i].Name == from {
			r.Peaks[i].Name = to
		}
	}
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

func quoteList(xs []string) string {
	q := make([]string, len(xs))
	for i, x := range xs {
		q[i] = fmt.Sprintf("%q", x)
	}
	return strings.Join(q, ", ")
}
