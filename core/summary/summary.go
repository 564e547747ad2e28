// Package summary condenses samples of numbers (durations, counts) into the figures people read:
// quantiles, mean, and histogram bins. Analyses share it so that a "median" means the same on
// every screen.
//
// Quantiles follow definition 7 of Hyndman and Fan (1996), "Sample quantiles in statistical
// packages", The American Statistician 50(4): linear interpolation between the order statistics
// at h = (n-1)p. It is the default of R, NumPy and spreadsheet software, so figures match what an
// analyst gets when checking by hand.
package summary

import (
	"math"
	"math/bits"
	"slices"
)

// Quantile returns the p-quantile (0 <= p <= 1) of sorted by definition 7; NaN for no data.
func Quantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := float64(n-1) * p
	lo := math.Floor(h)
	i := int(lo)
	if i >= n-1 {
		return sorted[n-1]
	}
	return sorted[i] + (h-lo)*(sorted[i+1]-sorted[i])
}

// QuantilesInPlace returns the quantiles of xs at the ascending levels ps, each exactly what
// Quantile gives on a sorted copy, without sorting: it reorders xs by selection (Hoare, "Algorithm
// 65: Find", CACM 1961, with a median-of-three pivot; past a depth of 2·log₂n the rest is sorted,
// as in Musser's introselect, 1997), which costs expected linear time instead of n·log n. It
// exists for summaries of large samples that need a few quantiles: the forecasts' transition
// systems read a median and two quartiles from every state, where sorting took most of the time.
func QuantilesInPlace(xs []float64, ps ...float64) []float64 {
	out := make([]float64, len(ps))
	n := len(xs)
	from := 0 // xs[:from] hold nothing above any quantile still to find
	for j, p := range ps {
		if n == 0 {
			out[j] = math.NaN()
			continue
		}
		h := float64(n-1) * p
		lo := math.Floor(h)
		i := min(int(lo), n-1)
		selectKth(xs, max(from, 0), n, i)
		v := xs[i]
		if i < n-1 && h > lo {
			v += (h - lo) * (slices.Min(xs[i+1:]) - v)
		}
		out[j] = v
		from = i
	}
	return out
}

// selectKth reorders xs[lo:hi] so that xs[k] is the value a sort would put there, nothing before
// it is greater and nothing after it is smaller.
func selectKth(xs []float64, lo, hi, k int) {
	depth := 2 * bits.Len(uint(hi-lo))
	for hi-lo > 16 {
		if depth == 0 {
			slices.Sort(xs[lo:hi])
			return
		}
		depth--
		mid := lo + (hi-lo)/2
		a, b, c := xs[lo], xs[mid], xs[hi-1]
		pivot := max(min(a, b), min(max(a, b), c))
		i, j := lo, hi-1
		for i <= j {
			for xs[i] < pivot {
				i++
			}
			for xs[j] > pivot {
				j--
			}
			if i <= j {
				xs[i], xs[j] = xs[j], xs[i]
				i++
				j--
			}
		}
		// now xs[lo:j+1] <= pivot <= xs[i:hi], and xs[j+1:i] equal the pivot
		switch {
		case k <= j:
			hi = j + 1
		case k >= i:
			lo = i
		default:
			return
		}
	}
	for i := lo + 1; i < hi; i++ { // insertion sort of the few left
		for j := i; j > lo && xs[j] < xs[j-1]; j-- {
			xs[j], xs[j-1] = xs[j-1], xs[j]
		}
	}
}

// Dist is the summary of a sample.
type Dist struct {
	N      int     `json:"n"`
	Min    float64 `json:"min"`
	P10    float64 `json:"p10"`
	P25    float64 `json:"p25"`
	Median float64 `json:"median"`
	P75    float64 `json:"p75"`
	P90    float64 `json:"p90"`
	Max    float64 `json:"max"`
	Mean   float64 `json:"mean"`
}

// Of summarises xs. It sorts xs in place (callers pass a slice they own). An empty sample gives
// a Dist with N = 0 and zero figures, which JSON can carry (NaN cannot).
func Of(xs []float64) Dist {
	if len(xs) == 0 {
		return Dist{}
	}
	slices.Sort(xs)
	sum := 0.0
	for _, x := range xs {
		sum += x
	}
	return Dist{
		N: len(xs), Min: xs[0], Max: xs[len(xs)-1], Mean: sum / float64(len(xs)),
		P10: Quantile(xs, 0.10), P25: Quantile(xs, 0.25), Median: Quantile(xs, 0.5),
		P75: Quantile(xs, 0.75), P90: Quantile(xs, 0.90),
	}
}

// Bin is one histogram bar: values in [Lo, Hi) (the last bin includes Hi).
type Bin struct {
	Lo    float64 `json:"lo"`
	Hi    float64 `json:"hi"`
	Count int     `json:"count"`
}

// Histogram splits sorted into k bins of equal width between its minimum and maximum. A sample
// of one distinct value gives one bin.
func Histogram(sorted []float64, k int) []Bin {
	if len(sorted) == 0 || k <= 0 {
		return nil
	}
	lo, hi := sorted[0], sorted[len(sorted)-1]
	if hi == lo {
		return []Bin{{Lo: lo, Hi: hi, Count: len(sorted)}}
	}
	w := (hi - lo) / float64(k)
	bins := make([]Bin, k)
	for i := range bins {
		bins[i].Lo = lo + float64(i)*w
		bins[i].Hi = lo + float64(i+1)*w
	}
	bins[k-1].Hi = hi
	for _, x := range sorted {
		i := int((x - lo) / w)
		if i >= k {
			i = k - 1
		}
		bins[i].Count++
	}
	return bins
}
