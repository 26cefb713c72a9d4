// Package format is how rampwise writes its numbers and labels wherever it
// shows them (the commands, the figure and sheet, the terminal UI), so that
// a resolution, a unit or the critical-pair mark reads the same everywhere.
// It returns strings; it prints nothing.
package format

import (
	"math"
	"math/big"
	"strconv"
	"strings"
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

// Num is a number as the file would hold it, without trailing zeros: 1.2,
// 325, 0.25; very small or very large magnitudes in exponent form (1e-09).
func Num(x float64) string {
	if a := math.Abs(x); a != 0 && (a < 1e-4 || a >= 1e9) {
		return strconv.FormatFloat(x, 'g', -1, 64)
	}
	return strconv.FormatFloat(x, 'f', -1, 64)
}

// RsAll is Rs for a run in which the targets named in notEluted elute after
// the program ends: the run does not meet the goal whatever the resolution
// of the pairs that did elute, and the summary says so and names them:
// "1.71 not met (target 1.50; nootkatone does not elute)". Without such
// targets it is Rs.
func RsAll(rs, target float64, notEluted []string) string {
	if len(notEluted) == 0 {
		return Rs(rs, target)
	}
	num := RsNumber(rs, target)
	return num + " not met (target " + Target(target) + "; " + NotEluted(notEluted) + ")"
}

// MetAll reports whether a run meets the goal: its minimum resolution
// reaches the target and every target elutes within the program.
func MetAll(rs, target float64, notEluted int) bool { return notEluted == 0 && Met(rs, target) }

// VerdictAll is the word for MetAll: "met" or "not met".
func VerdictAll(rs, target float64, notEluted int) string {
	if MetAll(rs, target, notEluted) {
		return "met"
	}
	return "not met"
}

// NotEluted names targets that elute after the program: "nootkatone does
// not elute", "a, b do not elute", "a, b, c and 2 more do not elute".
func NotEluted(names []string) string {
	const show = 3
	list := ""
	for i, n := range names {
		if i == show {
			list += " and " + strconv.Itoa(len(names)-show) + " more"
			break
		}
		if i > 0 {
			list += ", "
		}
		list += n
	}
	if len(names) == 1 {
		return list + " does not elute"
	}
	return list + " do not elute"
}

// StepDecimals is how many decimals show a multiple of the keypad step
// exactly: 0 for 1 or 5, 1 for 0.1 or 0.5, 2 for 0.01 or 0.25 (at most 6).
func StepDecimals(step float64) int {
	step = math.Abs(step)
	for d := 0; d < 6; d++ {
		p := math.Pow(10, float64(d))
		if math.Abs(step*p-math.Round(step*p)) < 1e-9*math.Max(1, step*p) {
			return d
		}
	}
	return 6
}

// OnStep is x rounded to the nearest multiple of step and written at the
// step's precision: OnStep(82.25, 0.1) is "82.3", never 82.30000000000001.
// The rounding is decimal, on the number as written (its shortest
// decimal form), half-way values away from zero, as a person rounds:
// 12.35 is 12.4 and 1.005 is 1.01 on steps of 0.1 and 0.01, although in
// binary 12.35 is 12.3499999… and a binary rounding gives 12.3. With no
// step (0) it is Clean(x).
func OnStep(x, step float64) string {
	if !(step > 0) || math.IsNaN(x) || math.IsInf(x, 0) || math.IsInf(step, 0) {
		return Clean(x)
	}
	d := StepDecimals(step)
	xr, ok1 := new(big.Rat).SetString(strconv.FormatFloat(x, 'g', -1, 64))
	sr, ok2 := new(big.Rat).SetString(strconv.FormatFloat(step, 'g', -1, 64))
	if !ok1 || !ok2 {
		return strconv.FormatFloat(math.Round(x/step)*step, 'f', d, 64)
	}
	q := new(big.Rat).Quo(xr, sr)
	// n = round(|q|) half up = floor((2·num + den) / (2·den)), signed
	num := new(big.Int).Abs(q.Num())
	den := new(big.Int).Lsh(q.Denom(), 1)
	n := new(big.Int).Quo(num.Add(num.Lsh(num, 1), q.Denom()), den)
	if q.Sign() < 0 {
		n.Neg(n)
	}
	v := new(big.Rat).Mul(new(big.Rat).SetInt(n), sr)
	out := v.FloatString(d)
	if strings.Trim(out, "-0.") == "" {
		out = strings.TrimPrefix(out, "-") // no "-0.0"
	}
	return out
}

// Clean is a computed number for a message: at most 12 significant digits,
// trailing zeros dropped, so that binary noise (36.66666666666667,
// 308.90000000000003) never shows; values as written in a file (at most
// 12 digits) are unchanged.
func Clean(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return strconv.FormatFloat(x, 'g', -1, 64)
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 12, 64), 64)
	return Num(r)
}
