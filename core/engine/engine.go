// Package engine is the request handling of the page's engine, in pure Go: it maps a request
// (kind and JSON payload, and for some kinds a file's bytes as a stream) to a response, and keeps
// the loaded log between requests. The wasm/ package only moves messages and bytes between the
// page's Web Worker and this package, so everything here is tested natively.
//
// The message API is versioned (APIVersion) and documented in DEVELOPERS.md. Requests carry an
// id; every response repeats it with a kind of "result", "progress" or "error". An error travels
// as data: a message, and where the file is at fault the line, column name or number, and the
// offending text.
package engine

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"runtime"
	"slices"
	"strings"
	"sync"
	"time"

	"tracewright/core/bpmn"
	"tracewright/core/conformance"
	"tracewright/core/dfg"
	"tracewright/core/discovery"
	"tracewright/core/eventlog"
	"tracewright/core/intake"
	"tracewright/core/layout"
	"tracewright/core/overview"
	"tracewright/core/petri"
	"tracewright/core/predict"
	"tracewright/core/render"
	"tracewright/core/timestamp"
	"tracewright/core/tree"
)

// Version is the version of Tracewright, shown on the page and by the command-line tool.
const Version = "0.2.0"

// APIVersion is the version of the message API between page and engine. A page refuses an
// engine of another API version.
const APIVersion = 1

// Request is one message from the page.
type Request struct {
	V       int             `json:"v"`
	ID      int             `json:"id"`
	Kind    string          `json:"kind"`
	Payload json.RawMessage `json:"payload,omitempty"`
}

// Response is one message to the page.
type Response struct {
	V       int    `json:"v"`
	ID      int    `json:"id"`
	Kind    string `json:"kind"` // "result", "progress" or "error"
	Payload any    `json:"payload"`
}

// ErrorPayload is an error as data. Line is 1-based (0 when the error has no position); Column
// names the CSV column or XES attribute; Offset is the 1-based byte within the line for a broken
// file structure.
type ErrorPayload struct {
	Message string `json:"message"`
	Cause   string `json:"cause,omitempty"`
	Line    int    `json:"line,omitempty"`
	Column  string `json:"column,omitempty"`
	Offset  int    `json:"offset,omitempty"`
	Value   string `json:"value,omitempty"`
}

// File is what the page hands over with a request that reads a file: its name, its size in
// bytes (for progress) and its content as a stream.
type File struct {
	Name string
	Size int64
	R    io.Reader
}

// Engine holds the loaded log. Requests are handled one at a time, except cancel, which may
// arrive while a load runs.
type Engine struct {
	mu      sync.Mutex
	prevMap *layout.Result // the last flow map's layout, so that nodes keep their places
	log     *eventlog.Log
	conf    *conformance.Result // the last conformance check's alignments, for conformance_cases
	cancels map[int]context.CancelFunc
	// Yield, when set, is called now and then during long computations so that the host can
	// take pending messages (in the browser a "cancel" reaches the engine only when it yields).
	Yield func()
}

// New returns an engine with no log.
func New() *Engine { return &Engine{cancels: map[int]context.CancelFunc{}} }

// Handle answers one request. emit receives progress messages while a load runs; the returned
// Response is the final one (result or error). It is safe to call Handle for "cancel" from
// another goroutine while a load is running.
func (e *Engine) Handle(ctx context.Context, req Request, file *File, emit func(Response)) (resp Response) {
	// A panic is a bug of ours, never the user's: it becomes an error the page can show, so the
	// page is never left waiting on an engine that died.
	defer func() {
		if r := recover(); r != nil {
			resp = errorResponse(req.ID, fmt.Errorf("internal error in the engine (please report it): %v", r))
		}
	}()
	if req.V != APIVersion {
		return errorResponse(req.ID, fmt.Errorf("the page speaks message API %d, this engine %d", req.V, APIVersion))
	}
	var payload any
	var err error
	switch req.Kind {
	case "hello":
		payload = map[string]any{"version": Version, "api": APIVersion}
	case "sniff":
		payload, err = e.sniff(req.Payload, file)
	case "load":
		payload, err = e.load(ctx, req, file, emit)
	case "warm_up":
		payload, err = warmUp(ctx, file)
	case "overview":
		payload, err = e.overview(req.Payload)
	case "parse_time":
		payload, err = parseTimes(req.Payload)
	case "flow_map":
		payload, err = e.flowMap(req.Payload)
	case "model":
		payload, err = e.model(req.Payload)
	case "flow_detail":
		payload, err = e.flowDetail(req.Payload)
	case "case_events":
		payload, err = e.caseEvents(req.Payload)
	case "forecast":
		payload, err = e.forecast(ctx, req, emit)
	case "conformance":
		payload, err = e.conformance(ctx, req, file, emit)
	case "conformance_cases":
		payload, err = e.conformanceCases(req.Payload)
	case "cancel":
		payload, err = e.cancel(req.Payload)
	default:
		err = fmt.Errorf("unknown request kind %q", req.Kind)
	}
	if err != nil {
		return errorResponse(req.ID, err)
	}
	return Response{V: APIVersion, ID: req.ID, Kind: "result", Payload: payload}
}

// options reads a request's payload of options into o; an empty payload leaves o as it is (the
// defaults). what names the request in the error.
func options(raw json.RawMessage, o any, what string) error {
	if len(raw) == 0 {
		return nil
	}
	if err := json.Unmarshal(raw, o); err != nil {
		return fmt.Errorf("%s options: %w", what, err)
	}
	return nil
}

func errorResponse(id int, err error) Response {
	p := ErrorPayload{Message: err.Error()}
	var re *intake.RowError
	var se *intake.SyntaxError
	switch {
	case errors.As(err, &re):
		p.Line, p.Column, p.Value, p.Cause = re.Line, re.Column, re.Value, rootCause(re.Err)
	case errors.As(err, &se):
		p.Line, p.Offset, p.Cause = se.Line, se.Column, rootCause(se.Err)
	case errors.Is(err, context.Canceled):
		p.Message, p.Cause = "cancelled on request", "cancelled"
	}
	return Response{V: APIVersion, ID: id, Kind: "error", Payload: p}
}

// rootCause is the innermost error's text: the named cause (intake.ErrBadTime and the like).
func rootCause(err error) string {
	for {
		next := errors.Unwrap(err)
		if next == nil {
			return err.Error()
		}
		err = next
	}
}

// SniffResult says what a file is and, for CSV, what its first part suggests.
type SniffResult struct {
	Name   string        `json:"name"`
	Format intake.Format `json:"format"`
	CSV    *intake.Sniff `json:"csv,omitempty"`
	Notes  []string      `json:"notes,omitempty"`
	// Need is about how many bytes reading the whole file will allocate (0: unknown, as for a
	// gzip'd file), so that a host can make the memory ready while the user checks the columns:
	// in a browser, memory touched for the first time is slow (see package wasm).
	Need int64 `json:"-"`
}

// Bytes allocated per byte of file by a whole read (BenchmarkIntakeCSV: 120 MB for a CSV of
// 70 MB; a generated XES of 250 MB makes a log of about 120 MB).
const (
	needPerCSVByte = 1.7
	needPerXESByte = 0.5
)

// SniffOptions let the user fix the separator or the header and look again.
type SniffOptions struct {
	Separator string `json:"separator"`
	Header    string `json:"header"` // "yes", "no" or "" (decide)
}

func (e *Engine) sniff(raw json.RawMessage, f *File) (*SniffResult, error) {
	if f == nil {
		return nil, errors.New("sniff needs a file")
	}
	var so SniffOptions
	if err := options(raw, &so, "sniff"); err != nil {
		return nil, err
	}
	comma, err := intake.SeparatorOf(so.Separator)
	if err != nil {
		return nil, err
	}
	header, err := intake.HeaderModeOf(so.Header)
	if err != nil {
		return nil, err
	}
	text, format, notes, err := intake.Open(f.R)
	if err != nil {
		return nil, err
	}
	res := &SniffResult{Name: f.Name, Format: format, Notes: notes}
	if !strings.HasSuffix(strings.ToLower(f.Name), ".gz") {
		switch format {
		case intake.FormatCSV:
			res.Need = int64(needPerCSVByte * float64(f.Size))
		case intake.FormatXES:
			res.Need = int64(needPerXESByte * float64(f.Size))
		}
	}
	if format == intake.FormatCSV {
		head, err := io.ReadAll(io.LimitReader(text, intake.SampleBytes))
		if err != nil {
			return nil, err
		}
		if res.CSV, err = intake.SniffCSV(head, comma, header); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// LoadOptions are the user's choices for reading a file (all optional).
type LoadOptions struct {
	Mapping    intake.Mapping `json:"mapping"`
	TimeFormat string         `json:"time_format"`
	Separator  string         `json:"separator"`
	Header     string         `json:"header"` // "yes", "no" or "" (decide)
	SkipBad    bool           `json:"skip_bad_rows"`
	Classifier string         `json:"classifier"`
}

// LoadResult is the overview of the loaded log and how it was read.
type LoadResult struct {
	Name     string             `json:"name"`
	Overview *overview.Overview `json:"overview"`
	Read     *intake.Report     `json:"read"`
}

// progressEvery is the least time between two progress messages of a load. The reader reports
// every megabyte, and the page redraws its bar for each message: a 70 MB file read in the
// browser made 70 redraws, and the page's main and compositor threads used 230-280 ms of
// processor time during the read, on a machine of two cores where the engine needs one of them;
// with a message every 0.1 s they used 100-190 ms.
const progressEvery = 100 * time.Millisecond

func (e *Engine) load(ctx context.Context, req Request, f *File, emit func(Response)) (*LoadResult, error) {
	if f == nil {
		return nil, errors.New("load needs a file")
	}
	var lo LoadOptions
	if err := options(req.Payload, &lo, "load"); err != nil {
		return nil, err
	}
	opt := intake.Options{Size: f.Size, MaxReported: 20}
	opt.CSV.Mapping, opt.CSV.TimeFormat = lo.Mapping, lo.TimeFormat
	var err error
	if opt.CSV.Comma, err = intake.SeparatorOf(lo.Separator); err != nil {
		return nil, err
	}
	if opt.CSV.Header, err = intake.HeaderModeOf(lo.Header); err != nil {
		return nil, err
	}
	if lo.SkipBad {
		opt.OnError = intake.Skip
	}
	opt.XES.Classifier = lo.Classifier
	if emit != nil {
		var last time.Time
		opt.Progress = func(p intake.Progress) {
			if now := time.Now(); last.IsZero() || now.Sub(last) >= progressEvery {
				last = now
				emit(Response{V: APIVersion, ID: req.ID, Kind: "progress", Payload: p})
			}
		}
	}
	ctx, done := e.cancellable(ctx, req.ID)
	defer done()
	// The log loaded before goes first, and its memory is collected now, so that the new log
	// reuses it: in a browser the engine's memory never shrinks, and memory touched for the first
	// time is slow (a page fault for every 4 KB).
	e.mu.Lock()
	e.log, e.prevMap, e.conf = nil, nil, nil
	e.mu.Unlock()
	runtime.GC()
	l, rep, err := intake.Read(ctx, f.R, opt)
	if err != nil {
		return nil, err
	}
	e.mu.Lock()
	e.log, e.prevMap, e.conf = l, nil, nil
	e.mu.Unlock()
	if rep.CSV != nil {
		rep.CSV.Preview = nil // the page has it from sniff; keep the message small
	}
	return &LoadResult{Name: f.Name, Overview: overview.Of(l, overview.Options{}), Read: rep}, nil
}

// cancellable registers a context that a "cancel" request for id will cancel; done
// unregisters it.
func (e *Engine) cancellable(ctx context.Context, id int) (context.Context, func()) {
	ctx, cancel := context.WithCancel(ctx)
	e.mu.Lock()
	e.cancels[id] = cancel
	e.mu.Unlock()
	return ctx, func() {
		e.mu.Lock()
		delete(e.cancels, id)
		e.mu.Unlock()
		cancel()
	}
}

// warmUp reads a small log (the embedded demo) and throws it away. In Chromium a wasm function
// is first compiled quickly and plainly and recompiled well only once it has run a while; a
// 1M-event CSV read just after start-up took 4.5 s, the same read again 2.5 s (BenchmarkPage).
// Reading the demo log while the user looks at the start screen moves most of that cost to a
// moment when nobody waits.
func warmUp(ctx context.Context, f *File) (map[string]int, error) {
	if f == nil {
		return nil, errors.New("warm_up needs a file")
	}
	l, _, err := intake.Read(ctx, f.R, intake.Options{Size: f.Size})
	if err != nil {
		return nil, err
	}
	overview.Of(l, overview.Options{})
	return map[string]int{"events": l.NumEvents()}, nil
}

func (e *Engine) overview(raw json.RawMessage) (*overview.Overview, error) {
	var o overview.Options
	if err := options(raw, &o, "overview"); err != nil {
		return nil, err
	}
	e.mu.Lock()
	l := e.log
	e.mu.Unlock()
	if l == nil {
		return nil, errors.New("no log is loaded")
	}
	return overview.Of(l, o), nil
}

func (e *Engine) cancel(raw json.RawMessage) (map[string]bool, error) {
	var p struct {
		ID int `json:"id"`
	}
	if err := json.Unmarshal(raw, &p); err != nil {
		return nil, fmt.Errorf("cancel: %w", err)
	}
	e.mu.Lock()
	c, ok := e.cancels[p.ID]
	e.mu.Unlock()
	if ok {
		c()
	}
	return map[string]bool{"cancelled": ok}, nil
}

// TimeCheck is one value read under a layout: the time in RFC 3339, or why it did not read.
type TimeCheck struct {
	Value  string `json:"value"`
	Parsed string `json:"parsed,omitempty"`
	Error  string `json:"error,omitempty"`
}

// parseTimes reads sample values under a layout the user typed, so the page can show at once
// how the column will read.
func parseTimes(raw json.RawMessage) ([]TimeCheck, error) {
	var p struct {
		Layout string   `json:"layout"`
		Values []string `json:"values"`
	}
	if err := json.Unmarshal(raw, &p); err != nil {
		return nil, fmt.Errorf("parse_time: %w", err)
	}
	f, err := timestamp.ParseFormat(strings.TrimSpace(p.Layout))
	if err != nil {
		return nil, err
	}
	out := make([]TimeCheck, 0, len(p.Values))
	for _, v := range p.Values {
		if len(out) == 50 {
			break
		}
		c := TimeCheck{Value: v}
		if t, ok := f.ParseString(v); ok {
			c.Parsed = timestamp.FormatRFC3339(t)
		} else {
			c.Error = "does not match " + f.String()
		}
		out = append(out, c)
	}
	return out, nil
}

func (e *Engine) loaded() (*eventlog.Log, error) {
	e.mu.Lock()
	defer e.mu.Unlock()
	if e.log == nil {
		return nil, errors.New("no log is loaded")
	}
	return e.log, nil
}

// FlowMapOptions are the flow map's controls: the shares of activities and paths shown, and
// whether colours show how often or how long.
type FlowMapOptions struct {
	Activities float64 `json:"activities"`
	Edges      float64 `json:"edges"`
	Durations  bool    `json:"durations"`
	LeftRight  bool    `json:"left_right"`
}

// FlowMap is a drawn directly-follows graph with its numbers, for details on click.
type FlowMap struct {
	SVG   string     `json:"svg"`
	Graph *dfg.Graph `json:"graph"`
}

func (e *Engine) flowMap(raw json.RawMessage) (*FlowMap, error) {
	var o FlowMapOptions
	if err := options(raw, &o, "flow_map"); err != nil {
		return nil, err
	}
	l, err := e.loaded()
	if err != nil {
		return nil, err
	}
	g := dfg.Build(l, dfg.Options{Activities: o.Activities, Edges: o.Edges})
	opt := render.DFGOptions{Mode: render.Counts}
	if o.Durations {
		opt.Mode = render.Durations
	}
	if o.LeftRight {
		opt.Direction = layout.LeftRight
	}
	e.mu.Lock()
	opt.Previous = e.prevMap
	e.mu.Unlock()
	svg, res, err := render.DFG(g, opt)
	if err != nil {
		return nil, err
	}
	e.mu.Lock()
	e.prevMap = res
	e.mu.Unlock()
	return &FlowMap{SVG: svg, Graph: g}, nil
}

// ModelOptions choose the discovery method.
type ModelOptions struct {
	Method string  `json:"method"` // "im" (default), "imd" or "alpha"
	Noise  float64 `json:"noise"`
	// Variants discovers from the most frequent paths that cover this share of the cases
	// (discovery.Log.Frequent); 0 or 1 takes them all.
	Variants float64 `json:"variants"`
}

// Model is a discovered model: the Petri net drawn, its exports, and what is known of it.
type Model struct {
	Method      string `json:"method"`
	Tree        string `json:"tree,omitempty"`
	SVG         string `json:"svg"`
	PNML        string `json:"pnml"`
	DOT         string `json:"dot"`
	BPMN        string `json:"bpmn,omitempty"` // for process trees (not for alpha's nets)
	TreeSVG     string `json:"tree_svg,omitempty"`
	Places      int    `json:"places"`
	Transitions int    `json:"transitions"`
	Sound       bool   `json:"sound"`
	Note        string `json:"note,omitempty"`
}

func (e *Engine) model(raw json.RawMessage) (*Model, error) {
	var o ModelOptions
	if err := options(raw, &o, "model"); err != nil {
		return nil, err
	}
	if o.Noise < 0 || o.Noise > 1 {
		return nil, fmt.Errorf("the noise threshold is a share between 0 and 1, not %v", o.Noise)
	}
	if o.Variants < 0 || o.Variants > 1 {
		return nil, fmt.Errorf("the share of paths to discover from is between 0 and 1, not %v", o.Variants)
	}
	l, err := e.loaded()
	if err != nil {
		return nil, err
	}
	dl := discovery.FromEventLog(l).Frequent(o.Variants)
	m := &Model{Method: o.Method}
	var net *petri.Net
	var t *tree.Node
	switch o.Method {
	case "", "im":
		t = discovery.InductiveMiner(dl, discovery.Options{Noise: o.Noise})
		m.Method = "im"
	case "imd":
		t = discovery.InductiveMinerGraph(dl, discovery.Options{Noise: o.Noise})
	case "alpha":
		a, err := discovery.Alpha(dl)
		if err != nil {
			return nil, err
		}
		net = a.PetriNet()
		m.Note = "The alpha algorithm finds no loops of one or two steps and no silent steps, and has no notion of noise; its nets are often not sound."
	default:
		return nil, fmt.Errorf("unknown method %q (im, imd or alpha)", o.Method)
	}
	var b strings.Builder
	if t != nil {
		m.Tree, net = t.String(), petri.FromTree(t)
		if err := bpmn.Write(&b, bpmn.FromTree(t), "model"); err != nil {
			return nil, err
		}
		m.BPMN = b.String()
		b.Reset()
		if m.TreeSVG, _, err = render.ProcessTree(t); err != nil {
			return nil, err
		}
	}
	net.Name = "model"
	m.Places, m.Transitions = len(net.Places), len(net.Transitions)
	m.Sound = net.Sound(200000) == nil
	if err := petri.WritePNML(&b, net); err != nil {
		return nil, err
	}
	m.PNML = b.String()
	b.Reset()
	if err := petri.WriteDOT(&b, net); err != nil {
		return nil, err
	}
	m.DOT = b.String()
	if m.SVG, _, err = render.PetriNet(net); err != nil {
		return nil, err
	}
	return m, nil
}

// flowDetail lists the cases behind a flow map node ({activities, node}) or path ({activities,
// from, to}); activity ids as in the graph's nodes (-1 start, -2 end).
func (e *Engine) flowDetail(raw json.RawMessage) ([]dfg.CaseRef, error) {
	var p struct {
		Activities float64 `json:"activities"`
		Node       *int32  `json:"node"`
		From       int32   `json:"from"`
		To         int32   `json:"to"`
	}
	if err := json.Unmarshal(raw, &p); err != nil {
		return nil, fmt.Errorf("flow_detail: %w", err)
	}
	l, err := e.loaded()
	if err != nil {
		return nil, err
	}
	from, to := p.From, p.To
	if p.Node != nil {
		from, to = *p.Node, -3
	}
	if from >= int32(l.Activities.Len()) || to >= int32(l.Activities.Len()) || from < -2 {
		return nil, fmt.Errorf("flow_detail: no such activity")
	}
	return dfg.TopCases(l, dfg.Options{Activities: p.Activities}, from, to, 5), nil
}

var isoDay, _ = timestamp.ParseFormat("YYYY-MM-DD[Thh:mm[:ss[.f]][Z]]")

// CaseEvents is one case's events in time order, for a forecast's detail. Resources are left
// out: the detail is about the case, not about who worked on it.
type CaseEvents struct {
	Case   string      `json:"case"`
	Events []CaseEvent `json:"events"`
}

// CaseEvent is one event of CaseEvents; Time is RFC 3339 UTC, "" when the event has none.
type CaseEvent struct {
	Activity  string `json:"activity"`
	Time      string `json:"time"`
	Lifecycle string `json:"lifecycle,omitempty"`
}

func (e *Engine) caseEvents(raw json.RawMessage) (*CaseEvents, error) {
	var p struct {
		Case string `json:"case"`
	}
	if err := json.Unmarshal(raw, &p); err != nil {
		return nil, fmt.Errorf("case_events: %w", err)
	}
	l, err := e.loaded()
	if err != nil {
		return nil, err
	}
	c, ok := l.Cases.Lookup(p.Case)
	if !ok {
		return nil, fmt.Errorf("the log has no case %q", p.Case)
	}
	out := &CaseEvents{Case: p.Case, Events: []CaseEvent{}}
	from, to := l.Events(int(c))
	for i := from; i < to; i++ {
		ev := CaseEvent{Activity: l.Activities.Name(l.Act[i]), Lifecycle: l.Lifecycles.Name(int32(l.Life[i]))}
		if t := l.Time[i]; t != eventlog.NoTime {
			ev.Time = timestamp.FormatRFC3339(t)
		}
		out.Events = append(out.Events, ev)
	}
	return out, nil
}

// ForecastOptions are the forecast view's settings.
type ForecastOptions struct {
	Abstraction string   `json:"abstraction"` // sequence (default), multiset, set, or auto (measured)
	ExportDate  string   `json:"export_date"` // RFC 3339; "" is the log's last timestamp
	Horizon     int      `json:"horizon"`
	Outcome     string   `json:"outcome"` // ends:X, contains:X, longer:10d, or ""
	End         []string `json:"end_activities"`
	KFold       int      `json:"kfold"`
	// Attribute names a case attribute whose value refines every state ("" for none, "auto" for
	// the one, if any, that lowered the error on past cases; predict.Choose).
	Attribute string `json:"attribute"`
}

// ForecastResult is the evaluation beside the forecasts, as the page must show them together.
type ForecastResult struct {
	Evaluation    *predict.Evaluation       `json:"evaluation"`
	KFold         *predict.Evaluation       `json:"kfold,omitempty"`
	KFoldCases    int                       `json:"kfold_cases,omitempty"` // the finished cases k-fold used: at most kfoldCases
	EndActivities []string                  `json:"end_activities"`
	Completed     int                       `json:"completed_cases"`
	Abandoned     int                       `json:"abandoned_cases"`
	InactiveDays  float64                   `json:"inactive_after_days"`
	Outcome       string                    `json:"outcome,omitempty"`
	Config        predict.Config            `json:"config"`
	Choices       []predict.Choice          `json:"choices,omitempty"` // when the states were chosen by measurement
	Search        predict.Search            `json:"search"`            // what was chosen by measurement
	Activities    []string                  `json:"activities"`        // for the end-activity picker
	CaseAttrs     []string                  `json:"case_attributes"`   // for the refinement picker
	Running       []predict.RunningForecast `json:"running"`
}

// kfoldCases bounds the finished cases the page's k-fold check uses: an even sample of 20,000
// measures the error to within its bootstrap range, and on a log of 1M events checking all of
// them took half of the forecast view's time in the browser.
const kfoldCases = 20_000

// ForecastProgress is the progress message of a forecast request: how many of the models it
// fits (one per fold, cut date and candidate state definition) are done.
type ForecastProgress struct {
	Done  int `json:"models_done"`
	Total int `json:"models"`
}

func (e *Engine) forecast(ctx context.Context, req Request, emit func(Response)) (*ForecastResult, error) {
	raw := req.Payload
	var o ForecastOptions
	if err := options(raw, &o, "forecast"); err != nil {
		return nil, err
	}
	l, err := e.loaded()
	if err != nil {
		return nil, err
	}
	cfg, search, err := predict.ParseSettings(o.Abstraction, o.Horizon, o.Attribute)
	if err != nil {
		return nil, err
	}
	auto := search.States || search.Attribute
	if o.Horizon < 0 {
		return nil, errors.New("the horizon is 0 (the whole prefix) or more")
	}
	if cfg.Attribute != "" && l.CaseAttr(cfg.Attribute) == nil {
		return nil, fmt.Errorf("the log has no case attribute %q", cfg.Attribute)
	}
	opt := predict.Options{Config: cfg}
	if len(o.End) > 0 {
		opt.EndActivities = o.End
	}
	if o.ExportDate != "" {
		t, ok := isoDay.ParseString(o.ExportDate)
		if !ok {
			return nil, fmt.Errorf("the export date %q is not a date like 2025-04-30", o.ExportDate)
		}
		opt.Export = t
	}
	res := &ForecastResult{Activities: slices.Sorted(slices.Values(l.Activities.Names())), CaseAttrs: []string{}}
	for _, c := range l.CaseAttrs {
		res.CaseAttrs = append(res.CaseAttrs, c.Key)
	}
	if o.Outcome != "" {
		if opt.Outcome, err = predict.ParseOutcome(o.Outcome); err != nil {
			return nil, err
		}
		res.Outcome = opt.Outcome.String()
	}
	part := predict.Split(l, opt)
	res.EndActivities, res.Completed, res.Abandoned = part.EndActivities, len(part.Completed), len(part.Abandoned)
	// Progress by models fitted: those of the choice (search.Models), 3 cut dates, the folds, and
	// the final model. Between models the host gets a turn (Yield), so that a cancel can arrive.
	total := 3 + 1 + search.Models(l)
	if o.KFold > 1 {
		total += o.KFold
	}
	ctx, done := e.cancellable(ctx, req.ID)
	defer done()
	fitted := 0
	opt.Step = func() error {
		fitted++
		if emit != nil {
			emit(Response{V: APIVersion, ID: req.ID, Kind: "progress", Payload: ForecastProgress{Done: min(fitted, total), Total: total}})
		}
		if e.Yield != nil {
			e.Yield()
		}
		return ctx.Err()
	}
	if auto {
		if opt.Config, res.Choices, err = predict.Choose(l, part, opt, search); err != nil {
			return nil, err
		}
	}
	res.Config, res.Search = opt.Config, search
	res.InactiveDays = part.Inactive.Hours() / 24
	if res.Evaluation, err = predict.Evaluate(l, part, opt); err != nil {
		return nil, err
	}
	if o.KFold > 1 {
		sample := part.Sample(kfoldCases)
		if res.KFold, err = predict.KFold(l, sample, opt, o.KFold); err != nil {
			return nil, err
		}
		res.KFoldCases = len(sample.Completed)
	}
	if _, res.Running, err = predict.ForecastRunning(l, part, opt); err != nil {
		return nil, err
	}
	if res.Running == nil {
		res.Running = []predict.RunningForecast{}
	}
	return res, nil
}
