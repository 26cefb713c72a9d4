// Package fsafe writes files so that nothing is lost: an atomic replace
// (temporary file in the same folder, flushed, renamed over the old one)
// for an ordinary file; a write-through for a file that must keep its
// identity (a symlink's target is followed; a device, a FIFO, or a file with
// several hard links is written in place, a regular one after a .bak copy).
// Owner, group and mode are kept. It also gives a file fingerprint (size,
// time, hash) so that a caller can notice a file changed on disk since it
// was read, and a reader that refuses non-regular files without blocking.
package fsafe

import (
	"bytes"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"
)

// WrapWriter lets tests put a failing writer (a full disk) between the data
// and the temporary file. Production code never changes it.
var WrapWriter = func(w io.Writer) io.Writer { return w }

// Error is a failed save. Path is the path the caller gave (never a
// temporary name); Unchanged says the old file is still as it was.
type Error struct {
	Path      string
	Unchanged bool
	Err       error
}

func (e *Error) Error() string {
	if e.Unchanged {
		return fmt.Sprintf("%s: cannot save (nothing was changed): %v", e.Path, e.Err)
	}
	return fmt.Sprintf("%s: cannot save: %v", e.Path, e.Err)
}

func (e *Error) Unwrap() error { return e.Err }

// cleanErr strips the temporary file's name out of an *fs.PathError or
// *os.LinkError so that a message names only what the user gave.
func cleanErr(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return fmt.Errorf("%s: %w", pe.Op, pe.Err)
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return fmt.Errorf("%s: %w", le.Op, le.Err)
	}
	return err
}

// WriteFile saves data at path without ever leaving a half-written file.
//
//   - path a symlink: the link is followed (to the end of a chain) and its
//     target is saved; the link stays a link.
//   - target a regular file with one link, or missing: atomic replace with
//     mode, owner and group kept (a new file gets 0644).
//   - target a regular file with more than one hard link: copied to
//     TARGET.bak first, then rewritten in place, so every link sees the new
//     content.
//   - target a device, FIFO or other non-regular file: written in place (a
//     FIFO with no reader is an error, not a hang). No .bak: reading a
//     device or FIFO would consume or block.
//   - target a folder: an error.
func WriteFile(path string, data []byte) error {
	target, err := resolve(path)
	if err != nil {
		return &Error{Path: path, Unchanged: true, Err: cleanErr(err)}
	}
	st, err := os.Stat(target)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return replace(path, target, data, nil)
	case err != nil:
		return &Error{Path: path, Unchanged: true, Err: cleanErr(err)}
	case st.IsDir():
		return &Error{Path: path, Unchanged: true, Err: errors.New("is a folder")}
	case !st.Mode().IsRegular():
		return writeInPlace(path, target, data, st, false)
	case linkCount(target, st) > 1, !canKeepOwner(st):
		// Several links, or a file we could not give back to its owner
		// after a replace: rewrite it in place, after a .bak copy.
		return writeInPlace(path, target, data, st, true)
	}
	return replace(path, target, data, st)
}

// resolve follows symlinks in the last element of path (a chain of them),
// allowing the final target not to exist yet.
func resolve(path string) (string, error) {
	p := path
	for i := 0; i < 40; i++ {
		st, err := os.Lstat(p)
		if errors.Is(err, fs.ErrNotExist) {
			return p, nil
		}
		if err != nil {
			return "", err
		}
		if st.Mode()&fs.ModeSymlink == 0 {
			return p, nil
		}
		dest, err := os.Readlink(p)
		if err != nil {
			return "", err
		}
		if !filepath.IsAbs(dest) {
			dest = filepath.Join(filepath.Dir(p), dest)
		}
		p = dest
	}
	return "", errors.New("too many levels of symbolic links")
}

// replace writes a temporary file beside target, flushes it, gives it the old
// file's mode/owner/group and renames it over target.
func replace(path, target string, data []byte, old fs.FileInfo) error {
	dir := filepath.Dir(target)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(target)+".tmp-*")
	if err != nil {
		switch {
		case errors.Is(err, fs.ErrNotExist):
			err = fmt.Errorf("the folder %s does not exist", dir)
		case errors.Is(err, fs.ErrPermission):
			err = fmt.Errorf("no permission to write in the folder %s", dir)
		default:
			err = cleanErr(err)
		}
		return &Error{Path: path, Unchanged: true, Err: err}
	}
	tmpName := tmp.Name()
	ok := false
	defer func() {
		if !ok {
			tmp.Close()
			os.Remove(tmpName)
		}
	}()
	fail := func(err error) error { return &Error{Path: path, Unchanged: true, Err: cleanErr(err)} }
	if _, err := WrapWriter(tmp).Write(data); err != nil {
		return fail(err)
	}
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	mode := newFileMode()
	if old != nil {
		mode = old.Mode().Perm()
	}
	if err := tmp.Chmod(mode); err != nil && !isUnsupported(err) {
		return fail(err)
	}
	if old != nil {
		if err := keepOwner(tmp, old); err != nil {
			return fail(err)
		}
	}
	if err := tmp.Close(); err != nil {
		return fail(err)
	}
	if err := renameReplace(tmpName, target); err != nil {
		return fail(err)
	}
	ok = true
	syncDir(dir)
	return nil
}

// writeInPlace rewrites target's content keeping its identity (inode, links,
// device). backup asks for a TARGET.bak copy first.
func writeInPlace(path, target string, data []byte, st fs.FileInfo, backup bool) error {
	if backup {
		old, err := os.ReadFile(target)
		if err != nil {
			return &Error{Path: path, Unchanged: true, Err: cleanErr(err)}
		}
		bak := target + ".bak"
		if err := WriteFile(bak, old); err != nil {
			return &Error{Path: path, Unchanged: true, Err: fmt.Errorf("backup copy: %v", err)}
		}
	}
	f, err := openInPlace(target, st)
	if err != nil {
		return &Error{Path: path, Unchanged: true, Err: cleanErr(err)}
	}
	_, werr := WrapWriter(f).Write(data)
	if werr == nil && st.Mode().IsRegular() {
		werr = f.Truncate(int64(len(data)))
		if werr == nil {
			werr = f.Sync()
		}
	}
	cerr := f.Close()
	if werr == nil {
		werr = cerr
	}
	if werr != nil {
		e := &Error{Path: path, Err: cleanErr(werr)}
		if backup {
			e.Err = fmt.Errorf("%v (the old content is in %s)", e.Err, filepath.Base(target)+".bak")
		}
		return e
	}
	return nil
}

// retryRename calls rename until it succeeds, fails for a reason transient
// does not accept, or budget is spent; the waits grow from 5 ms to 200 ms.
func retryRename(rename func(from, to string) error, transient func(error) bool, from, to string, budget time.Duration) error {
	delay := 5 * time.Millisecond
	deadline := time.Now().Add(budget)
	for {
		err := rename(from, to)
		if err == nil || !transient(err) || time.Now().After(deadline) {
			return err
		}
		time.Sleep(delay)
		if delay < 200*time.Millisecond {
			delay *= 2
		}
	}
}

// Fingerprint identifies one state of a file: it changes when the file is
// rewritten, replaced or removed.
type Fingerprint struct {
	Exists  bool
	Size    int64
	ModTime time.Time
	Hash    [sha256.Size]byte
}

// Take records the fingerprint of the file at path now (following
// symlinks). A missing file gives a fingerprint with Exists false and no
// error; a non-regular file is not read (its hash is zero).
func Take(path string) (Fingerprint, error) {
	st, err := os.Stat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return Fingerprint{}, nil
	}
	if err != nil {
		return Fingerprint{}, err
	}
	fp := Fingerprint{Exists: true, Size: st.Size(), ModTime: st.ModTime()}
	if !st.Mode().IsRegular() {
		return fp, nil
	}
	f, _, err := openRegular(path)
	if err != nil {
		return Fingerprint{}, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f) // streamed: a huge file is not held in memory
	if err != nil {
		return Fingerprint{}, err
	}
	h.Sum(fp.Hash[:0])
	fp.Size = n
	return fp, nil
}

// Of is the fingerprint of data just read from or written to a file: size
// and hash, with the file's time taken from path if it can be.
func Of(path string, data []byte) Fingerprint {
	fp := Fingerprint{Exists: true, Size: int64(len(data)), Hash: sha256.Sum256(data)}
	if st, err := os.Stat(path); err == nil {
		fp.ModTime = st.ModTime()
	}
	return fp
}

// SameContent says whether the file holds the same bytes as when fp was
// taken (a touch that changes only the time is not a change).
func (fp Fingerprint) SameContent(now Fingerprint) bool {
	return fp.Exists == now.Exists && fp.Size == now.Size && fp.Hash == now.Hash
}

// Changed checks the file at path against fp: true when its content differs
// (or it appeared or vanished). A file that cannot be read counts as changed.
func (fp Fingerprint) Changed(path string) (bool, error) {
	st, err := os.Stat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return fp.Exists, nil
	}
	if err != nil {
		return true, err
	}
	if !fp.Exists {
		return true, nil
	}
	if !st.Mode().IsRegular() {
		return false, nil
	}
	// Always the hash: a same-size rewrite within the file system's time
	// resolution keeps size and time (and a touch alone is no change).
	now, err := Take(path)
	if err != nil {
		return true, err
	}
	return !fp.SameContent(now), nil
}

// ErrNotRegular is returned by ReadRegular for a FIFO, device, socket or
// folder.
var ErrNotRegular = errors.New("not a regular file")

// ReadRegular reads a whole regular file. A FIFO, device, socket or folder
// is refused at once (it is opened without blocking, then checked), so a
// path that names a FIFO never hangs. max > 0 bounds the size read.
func ReadRegular(path string, max int64) ([]byte, error) {
	f, st, err := openRegular(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var r io.Reader = f
	if max > 0 {
		if st.Size() > max {
			return nil, &fs.PathError{Op: "read", Path: path, Err: fmt.Errorf("file is %d bytes, larger than the %d allowed", st.Size(), max)}
		}
		r = io.LimitReader(f, max+1)
	}
	var buf bytes.Buffer
	buf.Grow(int(st.Size()) + 1)
	if _, err := buf.ReadFrom(r); err != nil {
		return nil, err
	}
	if max > 0 && int64(buf.Len()) > max {
		return nil, &fs.PathError{Op: "read", Path: path, Err: fmt.Errorf("file is larger than the %d bytes allowed", max)}
	}
	return buf.Bytes(), nil
}

// openRegular opens path for reading without blocking (a FIFO), checks it
// is a regular file, and returns it in blocking mode.
func openRegular(path string) (*os.File, fs.FileInfo, error) {
	f, err := openNoBlock(path)
	if err != nil {
		return nil, nil, err
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, nil, err
	}
	if !st.Mode().IsRegular() {
		f.Close()
		what := "not a regular file"
		switch {
		case st.IsDir():
			what = "is a folder, not a file"
		case st.Mode()&fs.ModeNamedPipe != 0:
			what = "is a FIFO (named pipe), not a regular file"
		case st.Mode()&fs.ModeDevice != 0:
			what = "is a device, not a regular file"
		}
		return nil, nil, &fs.PathError{Op: "open", Path: path, Err: fmt.Errorf("%s: %w", what, ErrNotRegular)}
	}
	if err := clearNoBlock(f); err != nil {
		f.Close()
		return nil, nil, err
	}
	return f, st, nil
}
