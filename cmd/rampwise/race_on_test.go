//go:build race

package main

// raceEnabled: under the race detector every start of the UI is several
// times slower, so long repeated tests run fewer tries.
const raceEnabled = true
