package methodfile

// Suggest is the name of names nearest to name by edit distance when it is
// a likely misspelling (at most 2 edits, and fewer than half the name's
// length), or "": the "did you mean" of a command-line name.
func Suggest(name string, names []string) string {
	best, bd := "", 3
	for _, n := range names {
		if d := editDistance(name, n); d < bd && 2*d < len(n) {
			best, bd = n, d
		}
	}
	return best
}
