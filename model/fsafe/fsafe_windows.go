//go:build windows

package fsafe

import (
	"errors"
	"io/fs"
	"os"
	"syscall"
	"time"
)

// Win32 error codes a replace can meet while another program (a virus
// scanner, an indexer, an editor) briefly holds the file open.
const (
	errAccessDenied     = syscall.Errno(5)
	errSharingViolation = syscall.Errno(32)
	errLockViolation    = syscall.Errno(33)
)

// renameReplace renames with replace-existing (os.Rename uses MoveFileEx
// with MOVEFILE_REPLACE_EXISTING on Windows), retrying for up to about two
// seconds while the target is held open by another program (a virus
// scanner, an indexer, an editor).
func renameReplace(from, to string) error {
	return retryRename(os.Rename, transient, from, to, 2*time.Second)
}

func transient(err error) bool {
	return errors.Is(err, errAccessDenied) || errors.Is(err, errSharingViolation) || errors.Is(err, errLockViolation)
}

func syncDir(string) {}

// linkCount asks Windows how many hard links the file has.
func linkCount(path string, _ fs.FileInfo) uint64 {
	p, err := syscall.UTF16PtrFromString(path)
	if err != nil {
		return 1
	}
	h, err := syscall.CreateFile(p, 0, syscall.FILE_SHARE_READ|syscall.FILE_SHARE_WRITE|syscall.FILE_SHARE_DELETE, nil, syscall.OPEN_EXISTING, syscall.FILE_FLAG_BACKUP_SEMANTICS, 0)
	if err != nil {
		return 1
	}
	defer syscall.CloseHandle(h)
	var info syscall.ByHandleFileInformation
	if err := syscall.GetFileInformationByHandle(h, &info); err != nil {
		return 1
	}
	return uint64(info.NumberOfLinks)
}

// keepOwner: a new file on Windows inherits the folder's ACL; owner and
// group in the Unix sense do not apply.
func canKeepOwner(fs.FileInfo) bool { return true }

func keepOwner(*os.File, fs.FileInfo) error { return nil }

func newFileMode() fs.FileMode { return 0o644 }

func isUnsupported(error) bool { return true }

// Opening a named pipe or device on Windows does not block the way a Unix
// FIFO does; open normally and let the caller check the kind.
func openNoBlock(path string) (*os.File, error) { return os.Open(path) }

func clearNoBlock(*os.File) error { return nil }

func openInPlace(path string, _ fs.FileInfo) (*os.File, error) {
	return os.OpenFile(path, os.O_WRONLY, 0)
}
