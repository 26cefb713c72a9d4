package main

import (
	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
)

// saveMethodOut writes m (derived from the method file src, "" or "-" for
// the demo) to out for --out. The user's text is kept: when out already
// holds a method, only what changed is written into it; otherwise the new
// file is src's text with the changes (its comments and layout carried
// over). A path that cannot be written is bad input (exit 2) and the
// message names out, never a temporary file.
func saveMethodOut(out, src string, m *methodfile.Method) error {
	var base []byte
	if cur, err := fsafe.ReadRegular(out, methodfile.MaxFileSize); err == nil {
		if _, perr := methodfile.Parse(out, cur); perr == nil {
			base = cur
		}
	}
	if base == nil {
		if src == "" || src == "-" {
			base = demoMethod
		} else if b, err := fsafe.ReadRegular(src, methodfile.MaxFileSize); err == nil {
			base = b
		}
	}
	_, err := methodfile.Save(out, base, m)
	return err
}
