//go:build !unix && !windows

package fsafe

import (
	"io/fs"
	"os"
)

func renameReplace(from, to string) error                   { return os.Rename(from, to) }
func syncDir(string)                                        {}
func linkCount(string, fs.FileInfo) uint64                  { return 1 }
func canKeepOwner(fs.FileInfo) bool                         { return true }
func keepOwner(*os.File, fs.FileInfo) error                 { return nil }
func newFileMode() fs.FileMode                              { return 0o644 }
func isUnsupported(error) bool                              { return true }
func openNoBlock(path string) (*os.File, error)             { return os.Open(path) }
func clearNoBlock(*os.File) error                           { return nil }
func openInPlace(p string, _ fs.FileInfo) (*os.File, error) { return os.OpenFile(p, os.O_WRONLY, 0) }
