//go:build race

package optimizer

func init() { raceEnabled = true }
