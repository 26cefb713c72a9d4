package methodfile

import (
	"fmt"
	"sort"
)

// canonPath is the canonical path of a table header's keys, numbering every
// array of tables on the path by its current element in counts (element
// count by canonical path): [run.oven] after the second [[run]] is
// run[2].oven. For an array-of-tables header (arrayHeader) the last key is
// left unnumbered: it is the array's own path.
func canonPath(keys []string, counts map[string]int, arrayHeader bool) string {
	cur := ""
	for i, key := range keys {
		cur = joinKey(cur, key)
		if i == len(keys)-1 && arrayHeader {
			break
		}
		if n := counts[cur]; n > 0 {
			cur = fmt.Sprintf("%s[%d]", cur, n)
		}
	}
	return cur
}

// lineTable returns the 1-based line of a byte offset in data, from a table
// of line starts: the parser's Shape counts lines from the top for every
// call, which made locating the keys of a 2000-compound method quadratic.
func lineTable(data []byte) func(off int) int {
	starts := []int{0}
	for i, c := range data {
		if c == '\n' {
			starts = append(starts, i+1)
		}
	}
	return func(off int) int { return sort.SearchInts(starts, off+1) }
}
