package export

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"

	"tracewright/core/eventlog"
	"tracewright/core/timestamp"
)

// CSVColumns are the names WriteCSV gives the log's own columns. A reader given these names
// (intake.Mapping) reads the file back without guessing.
var CSVColumns = struct{ Case, Activity, Time, Resource, Lifecycle string }{
	"case", "activity", "time", "resource", "lifecycle",
}

// WriteCSV writes the log as CSV, one row per event, cases in the log's order.
func WriteCSV(w io.Writer, l *eventlog.Log) error {
	return WriteCSVCases(w, l, nil)
}

// WriteCSVCases writes only the given cases (indices into the log, in the order given; nil
// writes all), for a log filtered to, say, the cases that deviate from a model. The file has
// the same columns as the whole log's would.
func WriteCSVCases(w io.Writer, l *eventlog.Log, cases []int32) error {
	bw := bufio.NewWriterSize(w, 1<<20)
	cw := csv.NewWriter(bw)
	// The five columns are always written, empty where the log has no value, so that scripts
	// can rely on the header.
	header := []string{CSVColumns.Case, CSVColumns.Activity, CSVColumns.Time, CSVColumns.Resource, CSVColumns.Lifecycle}
	used := map[string]bool{}
	for _, h := range header {
		used[h] = true
	}
	unique := func(k string) string {
		name := k
		for n := 2; used[name]; n++ {
			name = fmt.Sprintf("%s (%d)", k, n)
		}
		used[name] = true
		return name
	}
	for _, c := range l.CaseAttrs {
		header = append(header, unique(c.Key))
	}
	for _, c := range l.EventAttrs {
		header = append(header, unique(c.Key))
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	row := make([]string, len(header))
	var tbuf []byte
	if cases == nil {
		cases = make([]int32, l.NumCases())
		for c := range cases {
			cases[c] = int32(c)
		}
	}
	for _, ci := range cases {
		c := int(ci)
		from, to := l.Events(c)
		for e := from; e < to; e++ {
			row = row[:0]
			row = append(row, l.CaseID(c), l.Activities.Name(l.Act[e]))
			if t := l.Time[e]; t != eventlog.NoTime {
				tbuf = timestamp.AppendRFC3339(tbuf[:0], t)
				row = append(row, string(tbuf))
			} else {
				row = append(row, "")
			}
			if r := l.Res[e]; r >= 0 {
				row = append(row, l.Resources.Name(r))
			} else {
				row = append(row, "")
			}
			row = append(row, l.Lifecycles.Name(int32(l.Life[e])))
			for _, col := range l.CaseAttrs {
				v, _ := col.Text(c)
				row = append(row, v)
			}
			for _, col := range l.EventAttrs {
				v, _ := col.Text(e)
				row = append(row, v)
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return bw.Flush()
}
