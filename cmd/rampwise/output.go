package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"unicode/utf8"

	"github.com/rampwise/rampwise/model/fsafe"
	"github.com/rampwise/rampwise/model/methodfile"
	"github.com/rampwise/rampwise/model/textsafe"
)

// saveMethodOut writes m (derived from the method file src, "" or DemoArg
// for the demo, "-" for standard input) to out for --out. The user's text is kept: when out already
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
		if src == "" || src == DemoArg {
			base = demoMethod
		} else if src == "-" {
			base = stdinText
		} else if b, err := fsafe.ReadRegular(src, methodfile.MaxFileSize); err == nil {
			base = b
		}
	}
	_, err := methodfile.Save(out, base, m)
	return err
}

// inertWriter is the last line of defence for text output: whatever
// reaches it (a name some printing path forgot to pass through
// textsafe.Inert) goes out with terminal controls made visible: C0 controls
// other than newline and tab, DEL, C1 controls, the bidirectional controls
// and invalid UTF-8 bytes become \xNN or \uNNNN. Unlike textsafe.Inert it
// does not touch backslashes, so JSON written through it keeps its meaning
// (encoding/json never writes a raw control; a raw C1 or bidi character in
// a JSON string becomes the \uNNNN escape of the same character).
type inertWriter struct {
	w       io.Writer
	pending []byte // an incomplete UTF-8 sequence held for the next write
}

func (iw *inertWriter) Write(p []byte) (int, error) {
	data := p
	if len(iw.pending) > 0 {
		data = append(iw.pending, p...)
		iw.pending = nil
	}
	// Hold back a UTF-8 sequence cut by the end of this write.
	for i := len(data) - 1; i >= 0 && i >= len(data)-utf8.UTFMax+1; i-- {
		if utf8.RuneStart(data[i]) {
			if !utf8.FullRune(data[i:]) {
				iw.pending = append([]byte(nil), data[i:]...)
				data = data[:i]
			}
			break
		}
	}
	if _, err := iw.w.Write(inertBytes(data)); err != nil {
		return 0, err
	}
	return len(p), nil
}

// Flush writes a held-back incomplete sequence (escaped).
func (iw *inertWriter) Flush() {
	if len(iw.pending) > 0 {
		iw.w.Write(inertBytes(iw.pending))
		iw.pending = nil
	}
}

func inertBytes(b []byte) []byte {
	clean := true
	for i := 0; i < len(b); {
		c := b[i]
		if c < utf8.RuneSelf {
			if (c < 0x20 && c != '\n' && c != '\t') || c == 0x7f {
				clean = false
				break
			}
			i++
			continue
		}
		r, n := utf8.DecodeRune(b[i:])
		if (r == utf8.RuneError && n == 1) || unsafeRune(r) {
			clean = false
			break
		}
		i += n
	}
	if clean {
		return b
	}
	out := make([]byte, 0, len(b)+16)
	for i := 0; i < len(b); {
		c := b[i]
		if c < utf8.RuneSelf {
			if (c < 0x20 && c != '\n' && c != '\t') || c == 0x7f {
				out = fmt.Appendf(out, `\x%02x`, c)
			} else {
				out = append(out, c)
			}
			i++
			continue
		}
		r, n := utf8.DecodeRune(b[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			out = fmt.Appendf(out, `\x%02x`, c)
		case unsafeRune(r):
			out = fmt.Appendf(out, `\u%04x`, r)
		default:
			out = append(out, b[i:i+n]...)
		}
		i += n
	}
	return out
}

// unsafeRune: C1 controls and the bidirectional formatting characters (as
// textsafe.Inert treats them).
func unsafeRune(r rune) bool {
	return textsafe.Inert(string(r)) != string(r)
}

// inertLines makes each line of a message inert, keeping its line breaks.
func inertLines(s string) string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		lines[i] = textsafe.Message(l)
	}
	return strings.Join(lines, "\n")
}

// textOutput wraps stdout for every command but the UI (which draws with
// terminal controls of its own).
func textOutput(args []string, stdout io.Writer) (io.Writer, func()) {
	if len(args) == 0 || args[0] == "tui" {
		return stdout, func() {}
	}
	iw := &inertWriter{w: stdout}
	return iw, iw.Flush
}

// checkWritable checks, before any long work, that each non-empty path can
// be saved: its folder exists and is a folder, the path is not a folder,
// and a file can be created in the folder (a probe created and removed at
// once; the path itself is never created early, so nothing is half-saved).
// A failure is an *fsafe.Error naming the path, as the save itself would
// give (exit 2).
func checkWritable(paths ...string) error {
	for _, p := range paths {
		if p == "" {
			continue
		}
		fail := func(format string, args ...any) error {
			return &fsafe.Error{Path: p, Unchanged: true, Err: fmt.Errorf(format, args...)}
		}
		st, err := os.Stat(p)
		switch {
		case err == nil && st.IsDir():
			return fail("is a folder")
		case err == nil && !st.Mode().IsRegular():
			continue // a device or FIFO is written in place
		case err != nil && !errors.Is(err, fs.ErrNotExist):
			return fail("%v", cleanPathErr(err))
		}
		dir := filepath.Dir(p)
		dst, err := os.Stat(dir)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			return fail("the folder %s does not exist", dir)
		case err != nil:
			return fail("%v", cleanPathErr(err))
		case !dst.IsDir():
			return fail("%s is not a folder", dir)
		}
		probe, err := os.CreateTemp(dir, ".rampwise-check-*")
		if err != nil {
			return fail("the folder %s cannot be written: %v", dir, cleanPathErr(err))
		}
		probe.Close()
		os.Remove(probe.Name())
	}
	return nil
}

// cleanPathErr is err without the path an *fs.PathError repeats.
func cleanPathErr(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
