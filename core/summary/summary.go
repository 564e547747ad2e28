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
