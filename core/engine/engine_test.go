package engine

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/intake"
	"tracewright/core/predict"
)

func req(kind string, id int, payload string) Request {
	r := Request{V: APIVersion, ID: id, Kind: kind}
	if payload != "" {
		r.Payload = json.RawMessage(payload)
	}
	return r
}

func fileOf(name, body string) *File {
	return &File{Name: name, Size: int64(len(body)), R: strings.NewReader(body)}
}

// roundTrip turns a payload into plain JSON values, as the page receives it.
func roundTrip(t *testing.T, v any) map[string]any {
	t.Helper()
	b, err := json.Marshal(v)
	require.NoError(t, err)
	var m map[string]any
	require.NoError(t, json.Unmarshal(b, &m))
	return m
}

func TestHello(t *testing.T) {
	r := New().Handle(context.Background(), req("hello", 1, ""), nil, nil)
	assert.Equal(t, "result", r.Kind)
	assert.Equal(t, 1, r.ID)
	assert.Equal(t, Version, roundTrip(t, r.Payload)["version"])
}

func TestVersionMismatch(t *testing.T) {
	r := New().Handle(context.Background(), Request{V: 99, ID: 2, Kind: "hello"}, nil, nil)
	assert.Equal(t, "error", r.Kind)
	assert.Contains(t, r.Payload.(ErrorPayload).Message, "message API 99")
}

func TestSniffAndLoadDemo(t *testing.T) {
	data, err := os.ReadFile("../../testdata/workshop.csv")
	require.NoError(t, err)
	e := New()
	r := e.Handle(context.Background(), req("sniff", 1, ""), fileOf("workshop.csv", string(data)), nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	sn := r.Payload.(*SniffResult)
	assert.Equal(t, intake.FormatCSV, sn.Format)
	assert.Equal(t, "case_id", sn.CSV.Mapping.Case)
	assert.Equal(t, "started", sn.CSV.Mapping.Start)

	var progress []Response
	r = e.Handle(context.Background(), req("load", 2, `{"mapping":{"case":"case_id","activity":"activity","time":"completed","start":"started","resource":"resource"}}`),
		fileOf("workshop.csv", string(data)), func(p Response) { progress = append(progress, p) })
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	m := roundTrip(t, r.Payload)
	ov := m["overview"].(map[string]any)
	var truth struct{ Cases, Events, Activities, Variants int }
	tb, _ := os.ReadFile("../../testdata/workshop.truth.json")
	require.NoError(t, json.Unmarshal(tb, &truth))
	assert.Equal(t, float64(truth.Cases), ov["cases"])
	assert.Equal(t, float64(truth.Events), ov["events"])
	assert.Equal(t, float64(truth.Variants), ov["variants"])
	require.NotEmpty(t, progress)
	assert.Equal(t, "progress", progress[len(progress)-1].Kind)
	assert.Equal(t, 2, progress[0].ID)

	r = e.Handle(context.Background(), req("overview", 3, `{"top_variants":2}`), nil, nil)
	require.Equal(t, "result", r.Kind)
	assert.Len(t, roundTrip(t, r.Payload)["top_variants"], 2)
}

func TestLoadErrorsAreData(t *testing.T) {
	e := New()
	r := e.Handle(context.Background(), req("load", 4, ""), fileOf("bad.csv", "case,activity,time\n1,a,2024-01-01\n1,b,someday\n"), nil)
	require.Equal(t, "error", r.Kind)
	p := r.Payload.(ErrorPayload)
	assert.Equal(t, 3, p.Line)
	assert.Equal(t, "time", p.Column)
	assert.Equal(t, "someday", p.Value)
	assert.Contains(t, p.Message, "line 3")

	r = e.Handle(context.Background(), req("load", 5, ""), fileOf("bad.xes", "<log><trace>\n<event></trace></log>"), nil)
	require.Equal(t, "error", r.Kind)
	p = r.Payload.(ErrorPayload)
	assert.Equal(t, 2, p.Line)
	assert.Positive(t, p.Offset)

	r = e.Handle(context.Background(), req("sniff", 11, ""), fileOf("broken.csv", "case,activity,time\n1,a,2024-01-01\n1,\"b,2024-01-02\n"), nil)
	require.Equal(t, "error", r.Kind)
	p = r.Payload.(ErrorPayload)
	assert.Equal(t, 3, p.Line)
	assert.Equal(t, intake.ErrUnclosed.Error(), p.Cause)

	r = e.Handle(context.Background(), req("overview", 6, ""), nil, nil)
	assert.Equal(t, "error", r.Kind, "nothing loaded yet")

	// a load drops the log loaded before as it starts, so that the new one can reuse its memory:
	// after a failed load there is no log
	r = e.Handle(context.Background(), req("load", 7, ""), fileOf("good.csv", "case,activity,time\n1,a,2024-01-01\n1,b,2024-01-02\n"), nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	require.Equal(t, "result", e.Handle(context.Background(), req("overview", 8, ""), nil, nil).Kind)
	r = e.Handle(context.Background(), req("load", 9, ""), fileOf("bad.csv", "case,activity,time\n1,a,2024-01-01\n1,b,someday\n"), nil)
	require.Equal(t, "error", r.Kind)
	assert.Equal(t, "error", e.Handle(context.Background(), req("overview", 10, ""), nil, nil).Kind, "the earlier log is gone")
}

// blockingReader yields one row, then waits until the test lets it go on.
type blockingReader struct {
	first  io.Reader
	gate   chan struct{}
	passed bool
}

func (b *blockingReader) Read(p []byte) (int, error) {
	n, err := b.first.Read(p)
	if err == io.EOF && !b.passed {
		<-b.gate
		b.passed = true
		return copy(p, strings.Repeat("1,a,2024-01-01T00:00:00Z\n", 50000)), nil
	}
	if err == io.EOF {
		return copy(p, "1,a,2024-01-01T00:00:00Z\n"), nil // never ends on its own
	}
	return n, err
}

func TestCancel(t *testing.T) {
	e := New()
	gate := make(chan struct{})
	done := make(chan Response)
	body := &blockingReader{first: strings.NewReader("case,activity,time\n1,a,2024-01-01T00:00:00Z\n"), gate: gate}
	go func() {
		done <- e.Handle(context.Background(), req("load", 7, `{"mapping":{"case":"case","activity":"activity","time":"time"},"time_format":"YYYY-MM-DDThh:mm[:ss[.f]][Z]"}`), &File{Name: "x.csv", R: body}, nil)
	}()
	// wait until the load is registered, then cancel it
	for {
		e.mu.Lock()
		_, running := e.cancels[7]
		e.mu.Unlock()
		if running {
			break
		}
		time.Sleep(time.Millisecond) // wasm has one thread and no preemption: let the load run
	}
	c := e.Handle(context.Background(), req("cancel", 8, `{"id":7}`), nil, nil)
	assert.Equal(t, true, roundTrip(t, map[string]any{"p": c.Payload})["p"].(map[string]any)["cancelled"])
	close(gate)
	r := <-done
	require.Equal(t, "error", r.Kind)
	assert.Equal(t, "cancelled", r.Payload.(ErrorPayload).Cause)
}

func TestParseTime(t *testing.T) {
	r := New().Handle(context.Background(), req("parse_time", 9, `{"layout":"D.M.YYYY h:mm","values":["5.3.2024 7:08","31.2.2024 1:00"]}`), nil, nil)
	require.Equal(t, "result", r.Kind)
	got := r.Payload.([]TimeCheck)
	assert.Equal(t, "2024-03-05T07:08:00Z", got[0].Parsed)
	assert.NotEmpty(t, got[1].Error)
	r = New().Handle(context.Background(), req("parse_time", 10, `{"layout":"hh:mm","values":["x"]}`), nil, nil)
	assert.Equal(t, "error", r.Kind)
}

func TestFlowMapAndModel(t *testing.T) {
	data, err := os.ReadFile("../../testdata/workshop.csv")
	require.NoError(t, err)
	e := New()
	require.Equal(t, "result", e.Handle(context.Background(), req("load", 1, ""), fileOf("w.csv", string(data)), nil).Kind)
	r := e.Handle(context.Background(), req("flow_map", 2, `{"activities":0.9,"edges":0.6,"durations":true}`), nil, nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	fm := r.Payload.(*FlowMap)
	assert.Contains(t, fm.SVG, "<svg")
	assert.Positive(t, fm.Graph.HiddenEdges)
	r = e.Handle(context.Background(), req("flow_detail", 5, `{"activities":1,"from":0,"to":1}`), nil, nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	assert.NotEmpty(t, r.Payload)
	r = e.Handle(context.Background(), req("model", 3, `{"method":"im","noise":0.2}`), nil, nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	m := r.Payload.(*Model)
	assert.True(t, m.Sound)
	assert.Contains(t, m.PNML, "<pnml")
	assert.Contains(t, m.BPMN, "<definitions")
	assert.Contains(t, m.TreeSVG, "<svg")
	assert.Contains(t, m.Tree, "Register claim")
	r = e.Handle(context.Background(), req("model", 4, `{"method":"nope"}`), nil, nil)
	assert.Equal(t, "error", r.Kind)
	// from the most common paths only: a sound model, with no more steps than from all paths
	r = e.Handle(context.Background(), req("model", 5, `{"method":"im","noise":0.2,"variants":0.8}`), nil, nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	assert.True(t, r.Payload.(*Model).Sound)
	assert.LessOrEqual(t, r.Payload.(*Model).Transitions, m.Transitions)
	r = e.Handle(context.Background(), req("model", 6, `{"variants":1.5}`), nil, nil)
	assert.Equal(t, "error", r.Kind)
}

func TestForecast(t *testing.T) {
	data, err := os.ReadFile("../../testdata/workshop.csv")
	require.NoError(t, err)
	e := New()
	require.Equal(t, "result", e.Handle(context.Background(), req("load", 1, ""), fileOf("w.csv", string(data)), nil).Kind)
	r := e.Handle(context.Background(), req("forecast", 2, `{"abstraction":"multiset","outcome":"ends:Hand over bike","kfold":5}`), nil, nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	f := r.Payload.(*ForecastResult)
	assert.NotEmpty(t, f.Running)
	assert.Positive(t, f.Evaluation.TestPrefixes)
	assert.NotNil(t, f.KFold)
	assert.Equal(t, f.Completed, f.KFoldCases, "a small log is checked on all its finished cases")
	var progress []ForecastProgress
	r = e.Handle(context.Background(), req("forecast", 4, `{"abstraction":"auto","end_activities":["Hand over bike","Return bike"],"export_date":"2025-04-30","kfold":5}`), nil,
		func(p Response) { progress = append(progress, p.Payload.(ForecastProgress)) })
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	assert.Len(t, r.Payload.(*ForecastResult).Choices, 12)
	require.Len(t, progress, 36+3+5+1, "one message per model: 36 candidates, 3 cut dates, 5 folds, the forecasts")
	assert.Equal(t, ForecastProgress{Done: 45, Total: 45}, progress[len(progress)-1])
	// a cancelled forecast stops after the model it is fitting and says so
	stopped, stop := context.WithCancel(context.Background())
	stop()
	r = e.Handle(stopped, req("forecast", 8, `{"abstraction":"auto"}`), nil, nil)
	require.Equal(t, "error", r.Kind)
	assert.Equal(t, "cancelled", r.Payload.(ErrorPayload).Cause)
	r = e.Handle(context.Background(), req("forecast", 3, `{"outcome":"someday"}`), nil, nil)
	assert.Equal(t, "error", r.Kind)

	// refined by a case attribute; an attribute the log lacks is refused
	r = e.Handle(context.Background(), req("forecast", 5, `{"attribute":"warranty"}`), nil, nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	refined := r.Payload.(*ForecastResult)
	assert.Equal(t, "warranty", refined.Config.Attribute)
	assert.Contains(t, refined.CaseAttrs, "warranty")
	r = e.Handle(context.Background(), req("forecast", 6, `{"attribute":"colour"}`), nil, nil)
	assert.Equal(t, "error", r.Kind)
	// "auto": the states as given, then refined by each case attribute with few values; the
	// generator's lead times depend on the bike model (package synth)
	progress = nil
	r = e.Handle(context.Background(), req("forecast", 9, `{"abstraction":"multiset","attribute":"auto"}`), nil,
		func(p Response) { progress = append(progress, p.Payload.(ForecastProgress)) })
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	auto := r.Payload.(*ForecastResult)
	assert.Len(t, auto.Choices, 1+2, "without an attribute, by bike_model, by warranty")
	assert.Equal(t, predict.Search{Attribute: true}, auto.Search)
	assert.Equal(t, "bike_model", auto.Config.Attribute)
	assert.Equal(t, ForecastProgress{Done: 9 + 3 + 1, Total: 9 + 3 + 1}, progress[len(progress)-1])

	// the detail of a running case: its events so far, in time order
	rc := f.Running[0]
	r = e.Handle(context.Background(), req("case_events", 7, `{"case":"`+rc.Case+`"}`), nil, nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	ce := r.Payload.(*CaseEvents)
	require.NotEmpty(t, ce.Events)
	assert.Equal(t, rc.Last, ce.Events[len(ce.Events)-1].Activity)
	assert.True(t, slices.IsSortedFunc(ce.Events, func(a, b CaseEvent) int { return strings.Compare(a.Time, b.Time) }))
	r = e.Handle(context.Background(), req("case_events", 8, `{"case":"no such case"}`), nil, nil)
	assert.Equal(t, "error", r.Kind)
}

func TestConformance(t *testing.T) {
	data, err := os.ReadFile("../../testdata/workshop.csv")
	require.NoError(t, err)
	e := New()
	require.Equal(t, "result", e.Handle(context.Background(), req("load", 1, ""), fileOf("w.csv", string(data)), nil).Kind)
	var progress []ConformanceProgress
	r := e.Handle(context.Background(), req("conformance", 2, `{"source":"discovered","noise":0.2}`), nil, func(p Response) {
		progress = append(progress, p.Payload.(ConformanceProgress))
	})
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	c := r.Payload.(*ConformanceResult)
	require.NotEmpty(t, progress)
	last := progress[len(progress)-1]
	assert.Equal(t, last.Total, last.Done, "the last progress message says all variants are done")
	assert.Equal(t, len(c.Alignment.Variants), last.Total)
	// a cancelled request stops between variants and says so
	stopped, stop := context.WithCancel(context.Background())
	stop()
	r = e.Handle(stopped, req("conformance", 9, `{}`), nil, nil)
	require.Equal(t, "error", r.Kind)
	assert.Equal(t, "cancelled", r.Payload.(ErrorPayload).Cause)
	assert.Greater(t, c.Alignment.Fitness, 0.8)
	assert.Positive(t, c.LeftOut, "running cases are left out by default")
	var truth struct{ Cases int }
	tb, err := os.ReadFile("../../testdata/workshop.truth.json")
	require.NoError(t, err)
	require.NoError(t, json.Unmarshal(tb, &truth))
	assert.Equal(t, truth.Cases-c.LeftOut, c.Alignment.Cases, "every case not left out is aligned")
	assert.Greater(t, c.Alignment.Precision, 0.5)
	assert.NotEmpty(t, c.Activities)
	assert.Contains(t, c.SVG, "skipped", "the deviations are drawn on the model")
	assert.Positive(t, c.Timing.Cases)
	assert.Contains(t, c.TimingSVG, "median")
	for _, which := range []string{"fitting", "deviating"} {
		r = e.Handle(context.Background(), req("conformance_cases", 4, `{"which":"`+which+`"}`), nil, nil)
		require.Equal(t, "result", r.Kind, "%v", r.Payload)
		cs := r.Payload.(*CasesResult)
		back, _, err := intake.Read(context.Background(), strings.NewReader(cs.CSV), intake.Options{})
		require.NoError(t, err)
		assert.Equal(t, cs.Cases, back.NumCases(), "%s cases read back", which)
	}
	fit := c.Alignment.FittingCases
	r = e.Handle(context.Background(), req("conformance_cases", 5, `{"which":"fitting"}`), nil, nil)
	assert.Equal(t, fit, r.Payload.(*CasesResult).Cases)
	r = e.Handle(context.Background(), req("conformance_cases", 6, `{"which":"all"}`), nil, nil)
	assert.Equal(t, "error", r.Kind)
	r = e.Handle(context.Background(), req("conformance", 7, `{"costs":{"log":{"Test ride":-1}}}`), nil, nil)
	assert.Equal(t, "error", r.Kind, "negative costs are refused")
	pnml, err := os.ReadFile("../petri/testdata/running-example.pnml")
	require.NoError(t, err)
	r = e.Handle(context.Background(), req("conformance", 3, `{"source":"pnml"}`), fileOf("x.pnml", string(pnml)), nil)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	assert.NotEmpty(t, r.Payload.(*ConformanceResult).Unmatched.Labels, "the running example's labels are not the workshop's")
}

// TestSniffNeed: a sniff says about how much memory the whole read will allocate, for the host to
// make ready (package wasm), by format; for a gzip'd file it cannot tell.
func TestSniffNeed(t *testing.T) {
	csv := "case,activity,time\n1,a,2024-01-01\n1,b,2024-01-02\n"
	xes := `<log xes.version="1.0"><trace><string key="concept:name" value="1"/><event><string key="concept:name" value="a"/></event></trace></log>`
	for _, tc := range []struct {
		name, body string
		want       int64
	}{
		{"log.csv", csv, int64(needPerCSVByte * float64(len(csv)))},
		{"log.xes", xes, int64(needPerXESByte * float64(len(xes)))},
		{"log.csv.gz", csv, 0},
	} {
		r := New().Handle(context.Background(), req("sniff", 1, ""), fileOf(tc.name, tc.body), nil)
		require.Equal(t, "result", r.Kind, "%s: %v", tc.name, r.Payload)
		assert.Equal(t, tc.want, r.Payload.(*SniffResult).Need, tc.name)
		assert.NotContains(t, string(mustJSON(t, r.Payload)), "need", "not part of the message API")
	}
}

func mustJSON(t *testing.T, v any) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	require.NoError(t, err)
	return b
}

// TestLoadProgressThrottled: a load passes on the reader's first progress report at once and
// then at most one every progressEvery, however often the reader reports (every megabyte): the
// page redraws for each message.
func TestLoadProgressThrottled(t *testing.T) {
	var sb strings.Builder
	sb.WriteString("case,activity,time\n")
	for i := range 150_000 {
		fmt.Fprintf(&sb, "case-%06d,step %d,2025-03-%02d 10:%02d:00\n", i/5, i%5, 1+i%28, i%60)
	}
	var progress []intake.Progress
	start := time.Now()
	r := New().Handle(context.Background(), req("load", 1, ""), fileOf("big.csv", sb.String()), func(p Response) {
		progress = append(progress, p.Payload.(intake.Progress))
	})
	elapsed := time.Since(start)
	require.Equal(t, "result", r.Kind, "%v", r.Payload)
	require.Greater(t, sb.Len(), 4<<20, "the reader reports every megabyte")
	require.NotEmpty(t, progress)
	assert.LessOrEqual(t, len(progress), 1+int(elapsed/progressEvery))
}
