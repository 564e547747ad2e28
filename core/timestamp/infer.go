package timestamp

import (
	"strings"
	"sync"
)

// candidateFormats compiles candidates once, on first use; the formats are immutable.
var candidateFormats = sync.OnceValue(func() []*Format {
	var fs []*Format
	for _, c := range candidates {
		f, err := ParseFormat(c)
		if err != nil {
			panic("timestamp: bad built-in layout " + c)
		}
		fs = append(fs, f)
	}
	return fs
})

// candidates are the layouts Infer tries, most specific first (unexported, so that nothing can
// change them after candidateFormats compiled them). Day-first and month-first
// layouts come in pairs that differ only in the order of D and M.
var candidates = []string{
	"YYYY-MM-DDThh:mm[:ss[.f]][Z]",
	"YYYY-MM-DD hh:mm[:ss[.f]][Z]",
	"YYYY-MM-DD",
	"YYYY/MM/DD hh:mm[:ss[.f]]",
	"YYYY/MM/DD",
	"D.M.YYYY[ h:mm[:ss[.f]]]",
	"D/M/YYYY[ h:mm[:ss[.f]]]",
	"M/D/YYYY[ h:mm[:ss[.f]]]",
	"D/M/YYYY h:mm[:ss] AP",
	"M/D/YYYY h:mm[:ss] AP",
	"D-M-YYYY[ h:mm[:ss[.f]]]",
	"M-D-YYYY[ h:mm[:ss[.f]]]",
	"D MMM YYYY[ h:mm[:ss[.f]]]",
	"D. MMM YYYY[ h:mm[:ss[.f]]]",
	"D-MMM-YYYY[ h:mm[:ss[.f]]]",
	"D-MMM-YY[ h:mm[:ss[.f]]]",
	"MMM D, YYYY[ h:mm[:ss[.f]]]",
	"MMM D, YYYY h:mm[:ss] AP",
	"WWW, D MMM YYYY hh:mm[:ss] Z",
	"epoch-s",
	"epoch-ms",
}

// Inference is what Infer found.
type Inference struct {
	// Format parses every non-empty sample value; nil when no candidate does.
	Format *Format `json:"format"`
	// Ambiguous is set when another candidate with day and month swapped parses the sample too;
	// Alternative is that candidate. Format is then the day-first one (the order most of the
	// world writes), and the caller should ask the user.
	Ambiguous   bool    `json:"ambiguous"`
	Alternative *Format `json:"alternative,omitempty"`
	// Parsed and Total count the sample's non-empty values and how many the best candidate read.
	Parsed int `json:"parsed"`
	Total  int `json:"total"`
}

// epoch ranges: values read as epoch seconds or milliseconds must fall between 1971 and 2100,
// so that a column of plain counts or amounts is not taken for timestamps (common practice).
const (
	epochMin = 365 * 86400 * 1e6
	epochMax = 4102444800 * 1e6
)

// Infer finds the candidate layout that parses the most non-empty values of sample. A layout
// counts only if it parses at least 95% of them (a few malformed values must not hide the format
// of a column; they are reported later, row by row, when the column is read).
func Infer(sample []string) Inference { return InferShare(sample, 0.95) }

// InferShare is Infer with the least share of values the layout must parse, for a column that is
// known to hold times (the user said so, or its header does) but has many malformed values.
func InferShare(sample []string, minShare float64) Inference {
	best := Inference{}
	fs := candidateFormats()
	counts := make([]int, len(fs))
	total := 0
	for _, s := range sample {
		b := trimSpace([]byte(s))
		if len(b) == 0 {
			continue
		}
		total++
		for k, f := range fs {
			t, ok := f.Parse(b)
			if ok && f.epoch != 0 && (t < epochMin || t > epochMax) {
				ok = false
			}
			if ok {
				counts[k]++
			}
		}
	}
	best.Total = total
	if total == 0 {
		return best
	}
	bestK := -1
	for k := range fs {
		if counts[k] > 0 && (bestK < 0 || counts[k] > counts[bestK]) {
			bestK = k
		}
	}
	if bestK < 0 || float64(counts[bestK]) < float64(total)*minShare {
		if bestK >= 0 {
			best.Parsed = counts[bestK]
		}
		return best
	}
	best.Format, best.Parsed = fs[bestK], counts[bestK]
	if twin := swapDM(candidates[bestK]); twin != "" {
		for k, c := range candidates {
			if c == twin && counts[k] == counts[bestK] {
				best.Ambiguous = true
				best.Alternative = fs[k]
				if strings.HasPrefix(candidates[bestK], "M") {
					best.Format, best.Alternative = fs[k], fs[bestK]
				}
			}
		}
	}
	return best
}

// swapDM returns the layout with its day and month fields swapped, or "" for a layout that
// starts with the year (whose order is never in doubt).
func swapDM(layout string) string {
	if strings.Contains(layout, "MMM") {
		return "" // a month name is never a day
	}
	switch {
	case strings.HasPrefix(layout, "D/M"), strings.HasPrefix(layout, "D-M"):
		return "M" + layout[1:2] + "D" + layout[3:]
	case strings.HasPrefix(layout, "M/D"), strings.HasPrefix(layout, "M-D"):
		return "D" + layout[1:2] + "M" + layout[3:]
	}
	return ""
}
