package main

import (
	"fmt"
	"io"
	"runtime"
	"runtime/debug"
)

// version is set at build time with
// go build -ldflags "-X main.version=1.2.0" ./cmd/rampwise; otherwise the
// module version recorded by go install, or "devel".
var version = ""

func versionString() string {
	v := version
	if v == "" {
		v = "devel"
		if bi, ok := debug.ReadBuildInfo(); ok && bi.Main.Version != "" && bi.Main.Version != "(devel)" {
			v = bi.Main.Version
		}
	}
	return fmt.Sprintf("rampwise %s (%s, %s/%s)", v, runtime.Version(), runtime.GOOS, runtime.GOARCH)
}

func runVersion(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("version", "Usage: rampwise version\n\nPrints the version, the Go release it was built with, and the platform.\n", stderr)
	if _, err := parseArgsN(fs, args, 0, 0, "no arguments"); err != nil {
		return err
	}
	fmt.Fprintln(stdout, versionString())
	return nil
}
