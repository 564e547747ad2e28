package synth

import (
	"bufio"
	"cmp"
	"encoding/xml"
	"io"
	"math/rand/v2"
	"slices"
	"strconv"
	"time"
)

// RowOrder is the order in which rows are written.
type RowOrder string

// Row orders: by completion time (how most systems export), grouped by case, or shuffled (the
// hardest case for a reader, used by the intake benchmark).
const (
	ByTime   RowOrder = "time"
	ByCase   RowOrder = "case"
	Shuffled RowOrder = "random"
)

func (lg *Log) ordered(o RowOrder) []Instance {
	out := slices.Clone(lg.Instances)
	switch o {
	case ByCase:
		slices.SortStableFunc(out, func(a, b Instance) int { return int(a.Case - b.Case) })
	case Shuffled:
		r := rand.New(rand.NewPCG(lg.Config.Seed, 0x5f1e))
		r.Shuffle(len(out), func(i, j int) { out[i], out[j] = out[j], out[i] })
	}
	return out
}

const csvTime = "2006-01-02 15:04:05"

// CSVHeader is the header WriteCSV writes (with "started" only when the log has start times).
func (lg *Log) CSVHeader() []string {
	h := []string{"case_id", "activity"}
	if lg.Config.StartTimes {
		h = append(h, "started")
	}
	return append(h, "completed", "resource", "bike_model", "warranty", "cost")
}

// WriteCSV writes one row per activity instance. No field needs quoting: every name is ours.
func (lg *Log) WriteCSV(w io.Writer, o RowOrder) error {
	bw := bufio.NewWriterSize(w, 1<<20)
	for i, h := range lg.CSVHeader() {
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString(h)
	}
	bw.WriteByte('\n')
	var buf []byte
	for _, in := range lg.ordered(o) {
		c := &lg.Cases[in.Case]
		buf = append(buf[:0], c.ID...)
		buf = append(buf, ',')
		buf = append(buf, Activities[in.Activity].Name...)
		buf = append(buf, ',')
		if lg.Config.StartTimes {
			buf = time.Unix(in.Start, 0).UTC().AppendFormat(buf, csvTime)
			buf = append(buf, ',')
		}
		buf = time.Unix(in.End, 0).UTC().AppendFormat(buf, csvTime)
		buf = append(buf, ',')
		buf = append(buf, lg.Resources[in.Resource]...)
		buf = append(buf, ',')
		buf = append(buf, c.Model...)
		buf = append(buf, ',')
		buf = append(buf, c.Tier...)
		buf = append(buf, ',')
		if in.Cost > 0 {
			buf = strconv.AppendFloat(buf, in.Cost, 'f', 2, 64)
		}
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// WriteXES writes the log as XES: a trace per case (with the bike model and warranty tier as
// trace attributes) and, per instance, a start and a complete event, or a complete event alone.
func (lg *Log) WriteXES(w io.Writer) error {
	bw := bufio.NewWriterSize(w, 1<<20)
	bw.WriteString(`<?xml version="1.0" encoding="UTF-8"?>
<log xes.version="1849-2016" xmlns="http://www.xes-standard.org/">
	<extension name="Concept" prefix="concept" uri="http://www.xes-standard.org/concept.xesext"/>
	<extension name="Time" prefix="time" uri="http://www.xes-standard.org/time.xesext"/>
	<extension name="Lifecycle" prefix="lifecycle" uri="http://www.xes-standard.org/lifecycle.xesext"/>
	<extension name="Organizational" prefix="org" uri="http://www.xes-standard.org/org.xesext"/>
	<classifier name="Activity" keys="concept:name"/>
	<string key="concept:name" value="Workshop warranty repairs (invented)"/>
`)
	byCase := lg.ordered(ByCase)
	esc := func(s string) {
		xml.EscapeText(bw, []byte(s))
	}
	ev := func(in Instance, life string, t int64) {
		bw.WriteString("\t\t<event>\n\t\t\t<string key=\"concept:name\" value=\"")
		esc(Activities[in.Activity].Name)
		bw.WriteString("\"/>\n\t\t\t<string key=\"lifecycle:transition\" value=\"" + life + "\"/>\n")
		bw.WriteString("\t\t\t<string key=\"org:resource\" value=\"")
		esc(lg.Resources[in.Resource])
		bw.WriteString("\"/>\n\t\t\t<date key=\"time:timestamp\" value=\"")
		bw.WriteString(time.Unix(t, 0).UTC().Format(time.RFC3339))
		bw.WriteString("\"/>\n")
		if in.Cost > 0 && life == "complete" {
			bw.WriteString("\t\t\t<float key=\"cost\" value=\"" + strconv.FormatFloat(in.Cost, 'f', 2, 64) + "\"/>\n")
		}
		bw.WriteString("\t\t</event>\n")
	}
	for i := 0; i < len(byCase); {
		c := &lg.Cases[byCase[i].Case]
		bw.WriteString("\t<trace>\n\t\t<string key=\"concept:name\" value=\"" + c.ID + "\"/>\n")
		bw.WriteString("\t\t<string key=\"bike_model\" value=\"" + c.Model + "\"/>\n")
		bw.WriteString("\t\t<string key=\"warranty\" value=\"" + c.Tier + "\"/>\n")
		j := i
		for ; j < len(byCase) && byCase[j].Case == byCase[i].Case; j++ {
		}
		// events in time order, as XES traces are written
		type stamped struct {
			in    Instance
			life  string
			t     int64
			order int
		}
		var evs []stamped
		for k, in := range byCase[i:j] {
			if lg.Config.StartTimes {
				evs = append(evs, stamped{in, "start", in.Start, 2 * k})
			}
			evs = append(evs, stamped{in, "complete", in.End, 2*k + 1})
		}
		slices.SortStableFunc(evs, func(a, b stamped) int { return cmp.Compare(a.t, b.t) })
		for _, e := range evs {
			ev(e.in, e.life, e.t)
		}
		bw.WriteString("\t</trace>\n")
		i = j
	}
	bw.WriteString("</log>\n")
	return bw.Flush()
}

// Truth is what a reader and an overview must find in the log.
type Truth struct {
	Scenario       string         `json:"scenario"`
	Model          string         `json:"model"`
	Seed           uint64         `json:"seed"`
	Cases          int            `json:"cases"`
	Events         int            `json:"events"`
	Instances      int            `json:"activity_instances"`
	Activities     int            `json:"activities"`
	Variants       int            `json:"variants"`
	Resources      int            `json:"resources"`
	RunningCases   int            `json:"running_cases"`
	NoisyCases     int            `json:"noisy_cases"`
	Noise          map[string]int `json:"noise"`
	ActivityCounts map[string]int `json:"activity_instances_by_name"`
	Export         string         `json:"export_date"`
	CaseDetail     []Case         `json:"case_detail,omitempty"`
}

// Truth counts what the log holds. detail adds one entry per case.
func (lg *Log) Truth(detail bool) Truth {
	t := Truth{
		Scenario: "warranty repairs of electric bicycles at an invented workshop",
		Model:    ProcessTree, Seed: lg.Config.Seed, Cases: len(lg.Cases), Instances: len(lg.Instances),
		Noise: map[string]int{}, ActivityCounts: map[string]int{}, Export: lg.Export.Format(time.RFC3339),
	}
	t.Events = t.Instances
	if lg.Config.StartTimes {
		t.Events *= 2
	}
	variants := map[string]bool{}
	for _, c := range lg.Cases {
		key := ""
		for _, a := range c.Activity {
			key += a + "\x00"
		}
		variants[key] = true
		if c.Running {
			t.RunningCases++
		}
		if len(c.Noise) > 0 {
			t.NoisyCases++
		}
		for _, n := range c.Noise {
			t.Noise[n]++
		}
	}
	res := map[uint8]bool{}
	for _, in := range lg.Instances {
		t.ActivityCounts[Activities[in.Activity].Name]++
		res[in.Resource] = true
	}
	t.Activities = len(t.ActivityCounts)
	t.Resources = len(res)
	t.Variants = len(variants)
	if detail {
		t.CaseDetail = lg.Cases
	}
	return t
}
