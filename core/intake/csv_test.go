package intake

import (
	"bytes"
	"compress/gzip"
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/eventlog"
)

func readString(t *testing.T, in string, opt Options) (*eventlog.Log, *Report, error) {
	t.Helper()
	return Read(context.Background(), strings.NewReader(in), opt)
}

func traces(l *eventlog.Log) map[string]string {
	out := map[string]string{}
	for c := 0; c < l.NumCases(); c++ {
		var names []string
		for _, a := range l.Trace(c) {
			names = append(names, l.Activities.Name(a))
		}
		out[l.CaseID(c)] = strings.Join(names, ",")
	}
	return out
}

func TestReadCSVShapes(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   string
		opt  Options
		want map[string]string
	}{
		{"comma, ISO times, rows out of order",
			"case,activity,timestamp\n2,b,2024-01-02T10:00:00Z\n1,a,2024-01-01T09:00:00Z\n2,a,2024-01-02T09:00:00Z\n",
			Options{}, map[string]string{"1": "a", "2": "a,b"}},
		{"semicolon, German dates, decimal commas",
			"Fall;Aktivität;Zeitstempel;Betrag\nF1;Prüfen;5.3.2024 10:00;1,5\nF1;Zahlen;5.3.2024 11:00;2,25\n",
			Options{}, map[string]string{"F1": "Prüfen,Zahlen"}},
		{"tab separated, epoch milliseconds",
			"id\tstep\tepoch\nx\ts1\t1709622489000\nx\ts2\t1709622489500\n",
			Options{}, map[string]string{"x": "s1,s2"}},
		{"pipe separated, no header, roles by number",
			"k1|Open|2024-03-05 07:08:09\nk1|Close|2024-03-05 08:00:00\n",
			Options{CSV: CSVOptions{Header: HeaderAbsent, Mapping: Mapping{Case: "#1", Activity: "#2", Time: "#3"}}},
			map[string]string{"k1": "Open,Close"}},
		{"start and complete columns",
			"case,activity,start,end\nc,a,2024-01-01 08:00,2024-01-01 09:00\nc,b,2024-01-01 08:30,2024-01-01 08:45\n",
			Options{}, map[string]string{"c": "a,b"}},
		{"lifecycle column",
			"case,activity,time,lifecycle\nc,a,2024-01-01 08:00,start\nc,b,2024-01-01 08:10,complete\nc,a,2024-01-01 08:20,complete\n",
			Options{}, map[string]string{"c": "a,b"}},
		{"quoted newline in an activity name",
			"case,activity,time\n1,\"multi\nline\",2024-01-01T00:00:00Z\n",
			Options{}, map[string]string{"1": "multi\nline"}},
		{"month names, Oracle's DD-MON-RR",
			"CASE_ID,ACTIVITY,EVENT_DATE\nK1,Open,02-DEC-26\nK1,Close,01-JAN-27\nK2,Open,30-NOV-26\n",
			Options{}, map[string]string{"K1": "Open,Close", "K2": "Open"}},
		{"German month names",
			"Vorgang;Tätigkeit;Datum\nV1;Prüfen;3. März 2025 10:00\nV1;Zahlen;2. März 2025 09:00\n",
			Options{}, map[string]string{"V1": "Zahlen,Prüfen"}},
		{"explicit month-first format",
			"case,activity,time\n1,a,03/05/2024\n1,b,03/04/2024\n",
			Options{CSV: CSVOptions{TimeFormat: "M/D/YYYY"}}, map[string]string{"1": "b,a"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			l, _, err := readString(t, tc.in, tc.opt)
			require.NoError(t, err)
			assert.Equal(t, tc.want, traces(l))
		})
	}
}

func TestStartCompleteMakesInstances(t *testing.T) {
	l, rep, err := readString(t, "case,activity,start,end\nc,a,2024-01-01 08:00,2024-01-01 09:00\nc,b,2024-01-01 08:30,\n", Options{})
	require.NoError(t, err)
	assert.Equal(t, 2, rep.Rows)
	assert.Equal(t, 3, l.NumEvents(), "a row with start and end is two events; without a start it is one")
	assert.Equal(t, 2, l.NumInstances())
}

func TestRowErrors(t *testing.T) {
	const head = "case,activity,time\n"
	for _, tc := range []struct {
		name   string
		body   string
		line   int
		column string
		cause  error
	}{
		{"no case", "1,a,2024-01-01\n,b,2024-01-02\n", 3, "case", ErrNoCase},
		{"no activity", "1,a,2024-01-01\n1,,2024-01-02\n", 3, "activity", ErrNoActivity},
		{"no time", "1,a,2024-01-01\n1,b,\n", 3, "time", ErrNoTime},
		{"bad time", "1,a,2024-01-01\n1,b,2024-02-30\n", 3, "time", ErrBadTime},
		{"short row", "1,a,2024-01-01\n1,b\n", 3, "", ErrFieldCount},
		{"line counts quoted newlines", "1,\"x\ny\",2024-01-01\n1,b,never\n", 4, "time", ErrBadTime},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := readString(t, head+tc.body, Options{})
			var re *RowError
			require.True(t, errors.As(err, &re), "%v", err)
			assert.Equal(t, tc.line, re.Line)
			assert.Equal(t, tc.column, re.Column)
			assert.ErrorIs(t, err, tc.cause)
			assert.Contains(t, err.Error(), "line ")

			l, rep, err := readString(t, head+tc.body, Options{OnError: Skip})
			require.NoError(t, err)
			assert.Equal(t, 1, rep.Problems.Skipped, "the bad row is counted, never dropped silently")
			assert.Equal(t, tc.line, rep.Problems.First[0].Line)
			assert.Equal(t, 1, l.NumEvents())
		})
	}
}

func TestSkipReportIsCapped(t *testing.T) {
	var b strings.Builder
	b.WriteString("case,activity,time\n1,a,2024-01-01\n")
	for i := 0; i < 100; i++ {
		b.WriteString("1,b,bad\n")
	}
	_, rep, err := readString(t, b.String(), Options{OnError: Skip, MaxReported: 5, CSV: CSVOptions{Mapping: Mapping{Case: "case", Activity: "activity", Time: "time"}}})
	require.NoError(t, err)
	assert.Equal(t, 100, rep.Problems.Skipped)
	assert.Len(t, rep.Problems.First, 5)
	assert.Equal(t, map[string]int{ErrBadTime.Error(): 100}, rep.Problems.ByCause)
	assert.Contains(t, rep.Problems.Summary(), "and 97 more")
}

func TestRoleErrors(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		opt      Options
		msg      string
	}{
		{"unknown column", "case,activity,time\n1,a,2024-01-01\n", Options{CSV: CSVOptions{Mapping: Mapping{Case: "nope"}}}, `the case column "nope" is not in the file`},
		{"one column twice", "case,activity,time\n1,a,2024-01-01\n", Options{CSV: CSVOptions{Mapping: Mapping{Case: "case", Activity: "case", Time: "time"}}}, "given as both"},
		{"no timestamps anywhere", "case,activity,note\n1,a,x\n1,b,y\n", Options{}, "no column was found for the time"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := readString(t, tc.in, tc.opt)
			require.ErrorIs(t, err, ErrRoles)
			assert.Contains(t, err.Error(), tc.msg)
		})
	}
}

func TestEmptyAndBrokenFiles(t *testing.T) {
	_, _, err := readString(t, "", Options{})
	assert.ErrorIs(t, err, ErrEmpty)
	_, _, err = readString(t, "case,activity,time\n", Options{CSV: CSVOptions{Mapping: Mapping{Case: "case", Activity: "activity", Time: "time"}, TimeFormat: "YYYY-MM-DD"}})
	assert.ErrorIs(t, err, ErrNoEvents)
	_, _, err = readString(t, "case,activity,time\n1,a,2024-01-01\n1,\"b,2024-01-02\n", Options{})
	var se *SyntaxError
	require.True(t, errors.As(err, &se), "%v", err)
	assert.Equal(t, 3, se.Line)
	assert.Equal(t, 3, se.Column)
}

func TestBinaryIsRefused(t *testing.T) {
	_, _, err := readString(t, "PK\x03\x04\x14\x00\x06\x00rest of a zip", Options{})
	require.ErrorIs(t, err, ErrUnsupported)
	assert.Contains(t, err.Error(), "byte 6") // the NUL after PK\x03\x04\x14, counted from 1
}

func TestSniff(t *testing.T) {
	for _, tc := range []struct {
		name   string
		in     string
		comma  string
		header bool
		m      Mapping
	}{
		{"English export", "Case ID,Activity,Timestamp,Resource\nA1,Open,2024-01-01 08:00,r1\nA1,Close,2024-01-02 08:00,r2\nA2,Open,2024-01-01 09:00,r1\n",
			",", true, Mapping{Case: "Case ID", Activity: "Activity", Time: "Timestamp", Resource: "Resource"}},
		{"Dutch export", "zaak;activiteit;tijdstip;medewerker\nZ1;Intake;2024-01-01 08:00;m1\nZ1;Besluit;2024-01-02 08:00;m2\nZ2;Intake;2024-01-01 09:00;m1\n",
			";", true, Mapping{Case: "zaak", Activity: "activiteit", Time: "tijdstip", Resource: "medewerker"}},
		{"XES-style CSV", "case:concept:name,concept:name,time:timestamp,org:resource,lifecycle:transition\n1,a,2024-01-01T00:00:00Z,r,start\n1,a,2024-01-01T01:00:00Z,r,complete\n2,a,2024-01-01T01:00:00Z,r,complete\n",
			",", true, Mapping{Case: "case:concept:name", Activity: "concept:name", Time: "time:timestamp", Resource: "org:resource", Lifecycle: "lifecycle:transition"}},
		{"no header, guessed from values", "A1;Open;2024-01-01 08:00\nA1;Close;2024-01-02 08:00\nA2;Open;2024-01-01 09:00\nA2;Close;2024-01-03 09:00\n",
			";", false, Mapping{Case: "column 1", Activity: "column 2", Time: "column 3"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			sn, err := SniffCSV([]byte(tc.in), 0, HeaderAuto)
			require.NoError(t, err)
			assert.Equal(t, tc.comma, sn.Comma)
			assert.Equal(t, tc.header, sn.Header)
			assert.Equal(t, tc.m, sn.Mapping)
		})
	}
}

func TestSniffAmbiguousDates(t *testing.T) {
	sn, err := SniffCSV([]byte("case,activity,date\n1,a,01/02/2024\n1,b,03/04/2024\n"), 0, HeaderAuto)
	require.NoError(t, err)
	assert.True(t, sn.TimeAmbiguous)
	assert.Equal(t, "D/M/YYYY[ h:mm[:ss[.f]]]", sn.TimeFormat)
	assert.Equal(t, "M/D/YYYY[ h:mm[:ss[.f]]]", sn.TimeAlternative)
	_, rep, err := readString(t, "case,activity,date\n1,a,01/02/2024\n1,b,03/04/2024\n", Options{})
	require.NoError(t, err)
	require.Len(t, rep.Warnings, 1, "an ambiguous reading is said, not hidden")
	assert.Contains(t, rep.Warnings[0], "day-first")
}

func TestEncodings(t *testing.T) {
	want := map[string]string{"1": "Prüfung,Größe"}
	latin := []byte("case;activity;time\n1;Pr\xfcfung;2024-01-01\n1;Gr\xf6\xdfe;2024-01-02\n")
	l, rep, err := Read(context.Background(), bytes.NewReader(latin), Options{})
	require.NoError(t, err)
	assert.Equal(t, want, traces(l))
	assert.Contains(t, rep.Warnings[0], "Windows-1252")

	text := "case;activity;time\n1;Prüfung;2024-01-01\n1;Größe;2024-01-02\n"
	var u16 []byte
	u16 = append(u16, 0xff, 0xfe)
	for _, r := range text {
		u16 = append(u16, byte(r), byte(r>>8))
	}
	l, _, err = Read(context.Background(), bytes.NewReader(u16), Options{})
	require.NoError(t, err)
	assert.Equal(t, want, traces(l))

	var z bytes.Buffer
	zw := gzip.NewWriter(&z)
	zw.Write([]byte(text))
	zw.Close()
	l, _, err = Read(context.Background(), &z, Options{})
	require.NoError(t, err)
	assert.Equal(t, want, traces(l))
}

func TestProgressAndCancel(t *testing.T) {
	var b strings.Builder
	b.WriteString("case,activity,time\n")
	for i := 0; i < 200000; i++ {
		b.WriteString("c1,a,2024-01-01T00:00:00Z\n")
	}
	var calls []Progress
	_, _, err := Read(context.Background(), strings.NewReader(b.String()), Options{Size: int64(b.Len()), Progress: func(p Progress) { calls = append(calls, p) }})
	require.NoError(t, err)
	require.NotEmpty(t, calls)
	last := calls[len(calls)-1]
	assert.Equal(t, int64(b.Len()), last.Bytes)
	assert.Equal(t, 200000, last.Events)

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, _, err = Read(ctx, strings.NewReader(b.String()), Options{})
	assert.ErrorIs(t, err, context.Canceled)
}

func FuzzReadCSV(f *testing.F) {
	f.Add("case,activity,time\n1,a,2024-01-01T00:00:00Z\n1,b,2024-01-02T00:00:00Z\n")
	f.Add("Fall;Aktivität;Zeit\nF1;\"a;b\";5.3.2024 10:00\n")
	f.Add("case,activity,start,end\nc,a,2024-01-01 08:00,2024-01-01 09:00\n")
	f.Add("id\tstep\tepoch\nx\ts1\t1709622489000\n")
	f.Fuzz(func(t *testing.T, in string) {
		for _, p := range []Policy{Stop, Skip} {
			l, rep, err := Read(context.Background(), strings.NewReader(in), Options{OnError: p})
			if err != nil {
				continue
			}
			// every row became events or was counted as set aside
			assert.LessOrEqual(t, rep.Rows-rep.Problems.Skipped, l.NumEvents())
			assert.LessOrEqual(t, l.NumEvents(), 2*(rep.Rows-rep.Problems.Skipped))
		}
	})
}
