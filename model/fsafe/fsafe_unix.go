//go:build unix

package fsafe

import (
	"errors"
	"io/fs"
	"os"
	"syscall"
)

func renameReplace(from, to string) error { return os.Rename(from, to) }

// syncDir flushes the folder entry of a rename (best effort: some file
// systems refuse fsync on a folder).
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

func linkCount(_ string, st fs.FileInfo) uint64 {
	if s, ok := st.Sys().(*syscall.Stat_t); ok {
		return uint64(s.Nlink)
	}
	return 1
}

// canKeepOwner says whether a replacing file can be given the old file's
// owner: root can give a file away; anyone else only keeps an owner that is
// themselves.
func canKeepOwner(st fs.FileInfo) bool {
	s, ok := st.Sys().(*syscall.Stat_t)
	if !ok {
		return true
	}
	euid := os.Geteuid()
	return euid == 0 || int(s.Uid) == euid
}

// keepOwner gives the new file the old one's owner and group. Only root can
// give a file away; a normal user can still keep the group when they belong
// to it. A failure to change an owner that is already ours is no error.
func keepOwner(f *os.File, old fs.FileInfo) error {
	s, ok := old.Sys().(*syscall.Stat_t)
	if !ok {
		return nil
	}
	uid, gid := int(s.Uid), int(s.Gid)
	err := f.Chown(uid, gid)
	if err == nil {
		return nil
	}
	if os.Geteuid() == 0 {
		return err
	}
	// Not root: the owner is us (canKeepOwner); keep the group if we are in
	// it, else it becomes our own group, as any editor's save would.
	f.Chown(-1, gid)
	return nil
}

// newFileMode is the mode of a file that did not exist: 0644, as before
// (reading the umask would mean setting it, racing other goroutines that
// create files).
func newFileMode() fs.FileMode { return 0o644 }

func isUnsupported(err error) bool { return errors.Is(err, syscall.ENOTSUP) }

func openNoBlock(path string) (*os.File, error) {
	return os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
}

func clearNoBlock(f *os.File) error {
	return syscall.SetNonblock(int(f.Fd()), false)
}

// openInPlace opens an existing file for writing without replacing it. A
// FIFO is opened without blocking: with no reader that fails (ENXIO) at once
// instead of hanging.
func openInPlace(path string, st fs.FileInfo) (*os.File, error) {
	if st.Mode()&fs.ModeNamedPipe != 0 {
		f, err := os.OpenFile(path, os.O_WRONLY|syscall.O_NONBLOCK, 0)
		if errors.Is(err, syscall.ENXIO) {
			return nil, errors.New("it is a FIFO (named pipe) with no reader")
		}
		if err != nil {
			return nil, err
		}
		if err := syscall.SetNonblock(int(f.Fd()), false); err != nil {
			f.Close()
			return nil, err
		}
		return f, nil
	}
	return os.OpenFile(path, os.O_WRONLY, 0)
}
