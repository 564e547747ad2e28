package summary

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"gonum.org/v1/gonum/stat"
)

// TestQuantileDefinition7 works definition 7 of Hyndman and Fan (1996) by hand on a small sample.
func TestQuantileDefinition7(t *testing.T) {
	xs := []float64{1, 2, 3, 4, 10}
	for _, tc := range []struct{ p, want float64 }{
		{0, 1}, {1, 10},
		{0.5, 3},   // h = 4*0.5 = 2: x[2]
		{0.25, 2},  // h = 1: x[1]
		{0.9, 7.6}, // h = 3.6: x[3] + 0.6*(x[4]-x[3]) = 4 + 3.6
		{0.1, 1.4}, // h = 0.4: 1 + 0.4*(2-1)
	} {
		assert.InDelta(t, tc.want, Quantile(xs, tc.p), 1e-12, "p=%v", tc.p)
	}
	assert.True(t, math.IsNaN(Quantile(nil, 0.5)))
	assert.Equal(t, 4.5, Quantile([]float64{4, 5}, 0.5), "median of an even sample is the midpoint")
}

// TestAgainstGonum checks the mean against gonum/stat.Mean, and our quantiles against
// gonum/stat.Quantile with stat.LinInterp (definition 4 of Hyndman and Fan) through the identity
// that relates the two definitions: Q7(p) = Q4(p') with p' = (1 + p(n-1))/n.
func TestAgainstGonum(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 50; trial++ {
		n := 2 + r.IntN(200)
		xs := make([]float64, n)
		for i := range xs {
			xs[i] = r.ExpFloat64() * 100
		}
		slices.Sort(xs)
		d := Of(slices.Clone(xs))
		assert.InDelta(t, stat.Mean(xs, nil), d.Mean, 1e-9)
		for _, p := range []float64{0.1, 0.25, 0.5, 0.75, 0.9} {
			p4 := (1 + p*float64(n-1)) / float64(n)
			assert.InDelta(t, stat.Quantile(p4, stat.LinInterp, xs, nil), Quantile(xs, p), 1e-9, "n=%d p=%v", n, p)
		}
	}
}

// TestQuantilesInPlace: selection gives exactly Quantile on a sorted copy (itself checked
// against gonum above), on samples with many ties (the remaining time at a case's end is
// always 0), already sorted, reversed, large enough to exercise the partition and small enough
// for the insertion sort.
func TestQuantilesInPlace(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	ps := []float64{0, 0.1, 0.25, 0.5, 0.5, 0.75, 0.9, 1}
	for trial := 0; trial < 300; trial++ {
		n := 1 + r.IntN(3000)
		xs := make([]float64, n)
		for i := range xs {
			switch trial % 4 {
			case 0:
				xs[i] = r.ExpFloat64() * 100
			case 1:
				xs[i] = float64(r.IntN(4)) // ties
			case 2:
				xs[i] = float64(i) // sorted
			default:
				xs[i] = float64(n - i) // reversed
			}
		}
		sorted := slices.Sorted(slices.Values(xs))
		got := QuantilesInPlace(xs, ps...)
		for j, p := range ps {
			assert.Equal(t, Quantile(sorted, p), got[j], "trial %d, n=%d, p=%v", trial, n, p)
		}
		assert.ElementsMatch(t, sorted, xs, "only reordered")
	}
	got := QuantilesInPlace(nil, 0.5)
	assert.True(t, math.IsNaN(got[0]))
}

func TestHistogram(t *testing.T) {
	bins := Histogram([]float64{0, 1, 2, 3, 4, 10}, 5)
	counts := []int{}
	for _, b := range bins {
		counts = append(counts, b.Count)
	}
	assert.Equal(t, []int{2, 2, 1, 0, 1}, counts) // width 2: [0,2) [2,4) [4,6) [6,8) [8,10]
	assert.Len(t, Histogram([]float64{3, 3}, 5), 1)
}
