// Package format is how rampwise writes its numbers and labels wherever it
// shows them (the commands, the figure and sheet, the terminal UI), so that
// a resolution, a unit or the critical-pair mark reads the same everywhere.
// It returns strings; it prints nothing.
package format

import (
	"math"
	"strconv"
)

// Unit labels.
const (
	UnitDH       = "kJ/mol"
	UnitDS       = "J/(mol·K)"
	UnitDCp      = "J/(mol·K)"
	UnitTemp     = "°C"
	UnitRate     = "°C/min"
	UnitTime     = "min"
	UnitWidth    = "s"
	UnitFlow     = "mL/min"
	UnitPressure = "kPa"
)

// Column headings that the peak tables share.
const (
	HeadRsNext = "Rs to next"
	HeadTarget = "target"
)

// CriticalMark marks the critical pair (the counted pair of lowest
// resolution) in peak tables, the UI and the figure's legend.
const CriticalMark = "◆"

// CriticalPair is "◆ first / second".
func CriticalPair(first, second string) string { return CriticalMark + " " + first + " / " + second }

// Met reports whether a minimum resolution reaches the target (compared
// unrounded: 1.4951 does not reach 1.5).
func Met(rs, target float64) bool { return rs >= target }

// Verdict is the word for Met: "met" or "not met".
func Verdict(rs, target float64) string {
	if Met(rs, target) {
		return "met"
	}
	return "not met"
}

// RsDigits is how many decimals a resolution is shown with: 2, or 3 when
// it is within 0.01 of the target, and more while the shown value would
// read as the target itself on the wrong side of it (1.4999 is "1.4999",
// never "1.500 not met").
func RsDigits(rs, target float64) int {
	if math.IsNaN(rs) || math.IsInf(rs, 0) || !(math.Abs(rs-target) < 0.01) {
		return 2
	}
	d := 3
	for d < 6 {
		shown, _ := strconv.ParseFloat(strconv.FormatFloat(rs, 'f', d, 64), 64)
		if (shown >= target) == Met(rs, target) {
			break
		}
		d++
	}
	return d
}

// RsNumber is a resolution at RsDigits decimals; "–" when there is none.
func RsNumber(rs, target float64) string {
	if math.IsNaN(rs) || math.IsInf(rs, 0) {
		return "–"
	}
	return strconv.FormatFloat(rs, 'f', RsDigits(rs, target), 64)
}

// Target is the target resolution: two decimals, more when it has them.
func Target(target float64) string {
	s := strconv.FormatFloat(target, 'f', -1, 64)
	if t := strconv.FormatFloat(target, 'f', 2, 64); len(t) >= len(s) {
		return t
	}
	return s
}

// Rs is a minimum resolution with its verdict against the target:
// "1.495 not met (target 1.50)", "1.62 met (target 1.50)".
func Rs(rs, target float64) string {
	if math.IsNaN(rs) || math.IsInf(rs, 0) {
		return "– (no counted pair; target " + Target(target) + ")"
	}
	return RsNumber(rs, target) + " " + Verdict(rs, target) + " (target " + Target(target) + ")"
}

// Pair is the resolution of one adjacent pair in a peak table: two
// decimals, or RsDigits near the target.
func Pair(rs, target float64) string { return RsNumber(rs, target) }
