package export

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/eventlog"
	"tracewright/core/intake"
	"tracewright/core/synth"
	"tracewright/core/timestamp"
)

// dump writes a log as canonical text: what a round trip must keep. Times and numbers are
// compared by value: XES writes them in its own notation (2024-01-01T00:00 becomes
// 2024-01-01T00:00:00Z, 12,5 becomes 12.5).
func dump(l *eventlog.Log) string {
	var b strings.Builder
	attrs := func(cols []*eventlog.Column, i int) string {
		var kv []string
		for _, c := range cols {
			if v, ok := c.Text(i); ok {
				switch c.Kind {
				case eventlog.KindTime:
					v = timestamp.FormatRFC3339(c.Time[i])
				case eventlog.KindNumber:
					v = strconv.FormatFloat(c.Num[i], 'g', -1, 64)
				}
				kv = append(kv, fmt.Sprintf("%s:%s=%s", c.Key, c.Kind, v))
			}
		}
		sort.Strings(kv)
		return strings.Join(kv, " ")
	}
	for c := 0; c < l.NumCases(); c++ {
		fmt.Fprintf(&b, "case %q %s\n", l.CaseID(c), attrs(l.CaseAttrs, c))
		from, to := l.Events(c)
		for e := from; e < to; e++ {
			res := ""
			if l.Res[e] >= 0 {
				res = l.Resources.Name(l.Res[e])
			}
			fmt.Fprintf(&b, "  %q %d %q %q %s\n", l.Activities.Name(l.Act[e]), l.Time[e], res, l.Lifecycles.Name(int32(l.Life[e])), attrs(l.EventAttrs, e))
		}
	}
	return b.String()
}

func read(t testing.TB, data []byte, opt intake.Options) *eventlog.Log {
	t.Helper()
	l, _, err := intake.Read(context.Background(), bytes.NewReader(data), opt)
	require.NoError(t, err)
	return l
}

// csvBack reads what WriteCSV wrote, naming its columns so nothing is left to guessing.
var csvBack = intake.Options{CSV: intake.CSVOptions{Mapping: intake.Mapping{Case: CSVColumns.Case, Activity: CSVColumns.Activity,
	Time: CSVColumns.Time, Resource: CSVColumns.Resource, Lifecycle: CSVColumns.Lifecycle}, TimeFormat: "YYYY-MM-DDThh:mm[:ss[.f]][Z]"}}

func TestXESRoundTrip(t *testing.T) {
	src, err := os.ReadFile("../../testdata/standard.xes")
	require.NoError(t, err)
	l1 := read(t, src, intake.Options{})
	var out bytes.Buffer
	require.NoError(t, WriteXES(&out, l1))
	l2 := read(t, out.Bytes(), intake.Options{})
	assert.Equal(t, dump(l1), dump(l2))
	assert.Equal(t, l1.Meta.Classifiers, l2.Meta.Classifiers)
	assert.Equal(t, l1.Meta.Globals, l2.Meta.Globals)
	assert.Equal(t, l1.Meta.Attrs, l2.Meta.Attrs)
	// and once more: the written form is a fixed point
	var again bytes.Buffer
	require.NoError(t, WriteXES(&again, l2))
	assert.Equal(t, out.String(), again.String())
}

func TestGeneratedRoundTrips(t *testing.T) {
	lg := synth.Generate(synth.Config{Seed: 5, Events: 3000, Noise: 0.1, StartTimes: true, Shifts: true})
	var src bytes.Buffer
	require.NoError(t, lg.WriteCSV(&src, synth.Shuffled))
	l1 := read(t, src.Bytes(), intake.Options{})

	var asCSV, asXES bytes.Buffer
	require.NoError(t, WriteCSV(&asCSV, l1))
	require.NoError(t, WriteXES(&asXES, l1))
	assert.Equal(t, dump(l1), dump(read(t, asCSV.Bytes(), csvBack)), "CSV -> CSV")
	assert.Equal(t, dump(l1), dump(read(t, asXES.Bytes(), intake.Options{})), "CSV -> XES")
}

func TestCSVQuotesWhatNeedsIt(t *testing.T) {
	in := "case,activity,time,note\n\"a,1\",\"say \"\"hi\"\"\",2024-01-01T00:00:00Z,\"two\nlines\"\n"
	l1 := read(t, []byte(in), intake.Options{})
	var out bytes.Buffer
	require.NoError(t, WriteCSV(&out, l1))
	assert.Equal(t, dump(l1), dump(read(t, out.Bytes(), csvBack)))
}

func TestEscapingInXES(t *testing.T) {
	in := "case,activity,time\nc1,<script>alert(1)</script>,2024-01-01T00:00:00Z\nc1,a & b \"q\",2024-01-01T01:00:00Z\n"
	l1 := read(t, []byte(in), intake.Options{})
	var out bytes.Buffer
	require.NoError(t, WriteXES(&out, l1))
	assert.NotContains(t, out.String(), "<script>")
	assert.Equal(t, dump(l1), dump(read(t, out.Bytes(), intake.Options{})))
}

// TestDecimalCommaToXES: a number read with a decimal comma is written to XES as xs:double
// requires (a point; W3C XML Schema, part 2, section 3.2.5) and reads back as the same number.
func TestDecimalCommaToXES(t *testing.T) {
	in := "case;activity;time;cost\nc1;a;2024-01-01T00:00:00Z;12,5\nc1;b;2024-01-01T01:00:00Z;3\n"
	l1 := read(t, []byte(in), intake.Options{})
	var out bytes.Buffer
	require.NoError(t, WriteXES(&out, l1))
	assert.Contains(t, out.String(), `value="12.5"`)
	l2 := read(t, out.Bytes(), intake.Options{})
	assert.Equal(t, l1.EventAttr("cost").Num, l2.EventAttr("cost").Num)
}

// FuzzCSVRoundTrip reads any CSV the reader accepts, writes it, and reads it again: the same log.
func FuzzCSVRoundTrip(f *testing.F) {
	f.Add("case,activity,time\n1,a,2024-01-01T00:00:00Z\n1,b,2024-01-02T00:00:00.5+01:00\n")
	f.Add("c;a;t;x\n1;\"q\"\"\";5.3.2024 10:00;007\n")
	f.Fuzz(func(t *testing.T, in string) {
		l1, _, err := intake.Read(context.Background(), strings.NewReader(in), intake.Options{OnError: intake.Skip})
		if err != nil {
			return
		}
		var out bytes.Buffer
		require.NoError(t, WriteCSV(&out, l1))
		l2, _, err := intake.Read(context.Background(), bytes.NewReader(out.Bytes()), csvBack)
		require.NoError(t, err, "our own output must read back:\n%s", out.String())
		if dump(l1) != dump(l2) {
			t.Fatalf("round trip changed the log\nfirst:\n%s\nsecond:\n%s", dump(l1), dump(l2))
		}
	})
}

// FuzzXESRoundTrip does the same for XES.
func FuzzXESRoundTrip(f *testing.F) {
	seed, _ := os.ReadFile("../../testdata/standard.xes")
	f.Add(string(seed))
	f.Fuzz(func(t *testing.T, in string) {
		l1, _, err := intake.Read(context.Background(), strings.NewReader(in), intake.Options{OnError: intake.Skip})
		if err != nil {
			return
		}
		var out bytes.Buffer
		require.NoError(t, WriteXES(&out, l1))
		l2, _, err := intake.Read(context.Background(), bytes.NewReader(out.Bytes()), intake.Options{})
		require.NoError(t, err, "our own output must read back:\n%s", out.String())
		if dump(l1) != dump(l2) {
			t.Fatalf("round trip changed the log\nfirst:\n%s\nsecond:\n%s", dump(l1), dump(l2))
		}
	})
}
