package andi

import (
	"math"
	"sort"
)

// FindOptions tune FindPeaks. The zero value means the defaults below.
type FindOptions struct {
	// SmoothS is the Savitzky–Golay window in seconds (default 0.5 s, at
	// least 5 samples).
	SmoothS float64
	// MinSNR is the least apex height above the baseline, in units of the
	// trace's noise (default 8).
	MinSNR float64
	// BaselineS is the window of the rolling-minimum baseline in seconds
	// (default 30 s).
	BaselineS float64
}

// FindPeaks finds the peaks of the trace: the trace is smoothed and
// differentiated with quadratic Savitzky–Golay filters (Savitzky & Golay,
// Anal. Chem. 36 (1964) 1627: the 2nd-order smoothing and first-derivative
// convolutions in closed form); the baseline is a rolling minimum of the
// smoothed trace, averaged over the same window; the noise is the robust
// spread of the sample-to-sample differences (1.4826 MAD/√2); an apex is a
// sign change of the derivative whose height above the baseline is at
// least MinSNR times the noise. The apex time is refined by a parabola
// through the three highest smoothed samples; the width is measured at half
// the apex height (doubled from one side when a neighbour hides the other);
// the area is the trapezoidal sum above a straight baseline drawn between
// the peak's two valleys (drop lines between fused peaks). Peaks are
// returned in time order, without names.
func (c *Chromatogram) FindPeaks(opt FindOptions) []Peak {
	y := c.Values
	n := len(y)
	if n < 7 || !(c.IntervalS > 0) {
		return nil
	}
	dt := c.IntervalS
	if opt.SmoothS <= 0 {
		opt.SmoothS = 0.5
	}
	if opt.MinSNR <= 0 {
		opt.MinSNR = 8
	}
	if opt.BaselineS <= 0 {
		opt.BaselineS = 30
	}
	h := max(2, int(math.Round(opt.SmoothS/dt/2)))
	if 2*h+1 > n {
		h = (n - 1) / 2
	}
	s, d := savgol(y, h)

	// noise from the raw differences
	diff := make([]float64, n-1)
	for i := 1; i < n; i++ {
		diff[i-1] = math.Abs(y[i] - y[i-1])
	}
	sort.Float64s(diff)
	noise := 1.4826 * diff[len(diff)/2] / math.Sqrt2
	// baseline
	w := max(3, int(opt.BaselineS/dt))
	base := movingMean(rollingMin(s, w), w)
	amp := 0.0
	for i := range s {
		amp = math.Max(amp, s[i]-base[i])
	}
	if noise == 0 {
		noise = 1e-9 * math.Max(amp, 1)
	}
	thr := opt.MinSNR * noise

	var apexes []int
	for i := 1; i < n; i++ {
		if d[i-1] > 0 && d[i] <= 0 {
			j := i
			if s[i-1] > s[i] {
				j = i - 1
			}
			if s[j]-base[j] >= thr {
				apexes = append(apexes, j)
			}
		}
	}
	var out []Peak
	for k, a := range apexes {
		// valleys: the lowest point towards the neighbouring apex, or where
		// the trace returns to the baseline
		lo := 0
		if k > 0 {
			lo = apexes[k-1]
		}
		hi := n - 1
		if k+1 < len(apexes) {
			hi = apexes[k+1]
		}
		left := a
		for left > lo && s[left-1]-base[left-1] > 2*noise {
			left--
		}
		if left > lo {
			left--
		} else if k > 0 {
			left = argmin(s, lo, a)
		}
		right := a
		for right < hi && s[right+1]-base[right+1] > 2*noise {
			right++
		}
		if right < hi {
			right++
		} else if k+1 < len(apexes) {
			right = argmin(s, a, hi)
		}
		// parabolic apex
		ta := float64(a)
		ya := s[a]
		if a > 0 && a < n-1 {
			den := s[a-1] - 2*s[a] + s[a+1]
			if den < 0 {
				off := 0.5 * (s[a-1] - s[a+1]) / den
				if math.Abs(off) <= 1 {
					ta += off
					ya = s[a] - 0.25*(s[a-1]-s[a+1])*off
				}
			}
		}
		// baseline between the valleys
		bl := func(i int) float64 {
			if right == left {
				return base[i]
			}
			return s[left] + (s[right]-s[left])*float64(i-left)/float64(right-left)
		}
		bA := bl(a)
		height := ya - bA
		if height <= 0 {
			continue
		}
		half := bA + height/2
		// half-height crossings
		var tl, tr float64
		okL, okR := false, false
		for i := a; i > left; i-- {
			if s[i-1] <= half && s[i] > half {
				tl = float64(i-1) + (half-s[i-1])/(s[i]-s[i-1])
				okL = true
				break
			}
		}
		for i := a; i < right; i++ {
			if s[i+1] <= half && s[i] > half {
				tr = float64(i) + (s[i]-half)/(s[i]-s[i+1])
				okR = true
				break
			}
		}
		var wpts float64
		switch {
		case okL && okR:
			wpts = tr - tl
		case okL:
			wpts = 2 * (ta - tl)
		case okR:
			wpts = 2 * (tr - ta)
		default:
			continue
		}
		area := 0.0
		for i := left; i < right; i++ {
			area += 0.5 * ((y[i] - bl(i)) + (y[i+1] - bl(i+1))) * dt
		}
		out = append(out, Peak{
			TimeMin:  (c.DelayS + ta*dt) / 60,
			Height:   height,
			Area:     area,
			WidthMin: wpts * dt / 60,
		})
	}
	return out
}

func argmin(s []float64, lo, hi int) int {
	j := lo
	for i := lo; i <= hi; i++ {
		if s[i] < s[j] {
			j = i
		}
	}
	return j
}

// savgol returns the quadratic Savitzky–Golay smoothed trace and its first
// derivative per sample, window 2h+1. Smoothing weights
// 3(3h²+3h−1−5i²)/((2h+3)(2h+1)(2h−1)); derivative weights i/Σi² (the
// quadratic term does not enter the slope at the centre). Near the ends the
// window shrinks symmetrically.
func savgol(y []float64, h int) (s, d []float64) {
	n := len(y)
	s = make([]float64, n)
	d = make([]float64, n)
	for i := 0; i < n; i++ {
		m := min(h, i, n-1-i)
		if m < 2 {
			s[i] = y[i]
			if i > 0 && i < n-1 {
				d[i] = (y[i+1] - y[i-1]) / 2
			} else if i == 0 && n > 1 {
				d[i] = y[1] - y[0]
			} else if n > 1 {
				d[i] = y[i] - y[i-1]
			}
			continue
		}
		fm := float64(m)
		norm := (2*fm + 3) * (2*fm + 1) * (2*fm - 1) / 3
		var acc, dacc, sq float64
		for j := -m; j <= m; j++ {
			fj := float64(j)
			acc += (3*fm*fm + 3*fm - 1 - 5*fj*fj) * y[i+j]
			dacc += fj * y[i+j]
			sq += fj * fj
		}
		s[i] = acc / norm
		d[i] = dacc / sq
	}
	return s, d
}

// rollingMin is the minimum over a centred window of w samples (a
// monotone deque in a ring of indices, O(n), one allocation).
func rollingMin(x []float64, w int) []float64 {
	n := len(x)
	out := make([]float64, n)
	half := w / 2
	dq := make([]int, n) // indices; head..tail-1 live, increasing values
	head, tail := 0, 0
	j := 0
	for i := 0; i < n; i++ {
		for ; j < n && j <= i+half; j++ {
			for tail > head && x[dq[tail-1]] >= x[j] {
				tail--
			}
			dq[tail] = j
			tail++
		}
		for dq[head] < i-half {
			head++
		}
		out[i] = x[dq[head]]
	}
	return out
}

func movingMean(x []float64, w int) []float64 {
	n := len(x)
	out := make([]float64, n)
	pre := make([]float64, n+1)
	for i, v := range x {
		pre[i+1] = pre[i] + v
	}
	half := w / 2
	for i := range x {
		a, b := max(0, i-half), min(n, i+half+1)
		out[i] = (pre[b] - pre[a]) / float64(b-a)
	}
	return out
}
