package intake

import (
	"context"
	"errors"
	"fmt"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"tracewright/core/eventlog"
	"tracewright/core/timestamp"
)

func readXESFile(t *testing.T, path string, opt XESOptions) (*eventlog.Log, *Report) {
	t.Helper()
	f, err := os.Open(path)
	require.NoError(t, err)
	defer f.Close()
	l, rep, err := Read(context.Background(), f, Options{XES: opt})
	require.NoError(t, err)
	return l, rep
}

// TestXESStandard reads testdata/standard.xes, written by hand to the rules of IEEE 1849-2016:
// the concept, time, lifecycle and org extensions (section 6), every attribute type including
// list and container (section 5.3), meta-attributes, globals as defaults (section 5.5) and
// classifiers with a quoted key (section 5.6).
func TestXESStandard(t *testing.T) {
	l, rep := readXESFile(t, "../../testdata/standard.xes", XESOptions{})
	assert.Equal(t, "xes", rep.Format)
	assert.Equal(t, map[string]string{
		"T-1":         "Receive,Check <fast>",
		"__unnamed__": "__unnamed__,Decide", // globals name what the file left unnamed
		"T-1 (2)":     "Receive",            // a repeated trace name stays a case of its own
	}, traces(l))
	assert.Equal(t, 1, l.Untimed)
	require.Len(t, rep.Warnings, 2)
	assert.Contains(t, rep.Warnings[0], `repeats the case id "T-1"`)

	// xs:dateTime with an offset is converted to UTC (W3C XML Schema Part 2, section 3.2.7)
	want, _ := timestamp.FormatRFC3339(l.Time[0]), 0
	assert.Equal(t, "2024-05-02T07:00:00Z", want)
	assert.Equal(t, []int32{0, 2}, l.InstFirst[:2], "start and complete of Receive are one instance")

	kinds := func(cols []*eventlog.Column) map[string]eventlog.Kind {
		m := map[string]eventlog.Kind{}
		for _, c := range cols {
			m[c.Key] = c.Kind
		}
		return m
	}
	assert.Equal(t, map[string]eventlog.Kind{"priority": eventlog.KindNumber, "vip": eventlog.KindBool, "tags": eventlog.KindNested}, kinds(l.CaseAttrs))
	assert.Equal(t, map[string]eventlog.Kind{"amount": eventlog.KindNumber, "ref": eventlog.KindString, "work item": eventlog.KindString,
		"address": eventlog.KindNested, "note": eventlog.KindNested, "channel": eventlog.KindString}, kinds(l.EventAttrs))

	tags := l.CaseAttr("tags")
	text, ok := tags.Text(0)
	require.True(t, ok)
	n, err := eventlog.ParseNested(text)
	require.NoError(t, err)
	assert.Equal(t, "list", n.Type)
	require.Len(t, n.Children, 2)
	assert.Equal(t, "repeat & return", n.Children[1].Value, "entities are decoded")

	note := l.EventAttr("note")
	text, ok = note.Text(2)
	require.True(t, ok, "the meta-attribute keeps the note as a tree")
	n, _ = eventlog.ParseNested(text)
	assert.Equal(t, "checked", n.Value)
	assert.Equal(t, "author", n.Children[0].Key)

	ch := l.EventAttr("channel")
	vals := []string{}
	for i := 0; i < l.NumEvents(); i++ {
		v, _ := ch.Text(i)
		vals = append(vals, v)
	}
	assert.Equal(t, []string{"counter", "counter", "counter", "web", "counter", "counter"}, vals, "an event global fills what events lack")

	assert.Len(t, l.Meta.Extensions, 4)
	assert.Len(t, l.Meta.Globals, 3)
	require.Len(t, l.Meta.Classifiers, 3)
	assert.Equal(t, []string{"work item", "concept:name"}, l.Meta.Classifiers[2].Keys)
	assert.Len(t, l.Meta.Attrs, 2)
}

func TestXESClassifier(t *testing.T) {
	l, _ := readXESFile(t, "../../testdata/standard.xes", XESOptions{Classifier: "Activity and transition"})
	assert.Equal(t, "Receive+start,Receive+complete,Check <fast>+complete", traces(l)["T-1"])
	assert.NotNil(t, l.EventAttr("concept:name"), "with another classifier the names stay as an attribute")

	f, _ := os.Open("../../testdata/standard.xes")
	defer f.Close()
	_, _, err := Read(context.Background(), f, Options{XES: XESOptions{Classifier: "Nope"}})
	require.ErrorIs(t, err, ErrXES)
	assert.Contains(t, err.Error(), `"Activity and transition"`)
}

func TestXESErrors(t *testing.T) {
	const head = `<?xml version="1.0" encoding="UTF-8"?>` + "\n<log xes.version=\"1849-2016\">\n"
	for _, tc := range []struct {
		name  string
		in    string
		line  int
		cause error
		row   bool
	}{
		{"unclosed element", head + "<trace>\n<event>\n<string key=\"concept:name\" value=\"a\">\n</event>\n</trace>\n</log>\n", 6, ErrXES, false},
		{"ends inside an element", head + "<trace>\n<event>\n", 5, ErrXES, false},
		{"wrong root", `<?xml version="1.0"?>` + "\n<html>\n</html>\n", 2, ErrXES, false},
		{"attribute without key", head + "<trace>\n<string value=\"x\"/>\n</trace>\n</log>\n", 4, ErrXES, false},
		{"bad date", head + "<trace>\n<event>\n<string key=\"concept:name\" value=\"a\"/>\n<date key=\"time:timestamp\" value=\"yesterday\"/>\n</event>\n</trace>\n</log>\n", 4, ErrBadTime, true},
		{"no activity", head + "<trace>\n<event>\n<date key=\"time:timestamp\" value=\"2024-01-01T00:00:00Z\"/>\n</event>\n</trace>\n</log>\n", 4, ErrNoActivity, true},
		{"bad entity", head + "<trace>\n<string key=\"concept:name\" value=\"a &bogus; b\"/>\n</trace>\n</log>\n", 4, ErrXES, false},
		// XML 1.0 section 2.2 allows no control characters but tab, line feed and carriage return
		{"control character", head + "<trace>\n<string key=\"concept:name\" value=\"a\x14b\"/>\n</trace>\n</log>\n", 4, ErrXES, false},
		{"declared encoding unknown", `<?xml version="1.0" encoding="EBCDIC"?>` + "\n<log/>\n", 1, ErrUnsupported, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := readString(t, tc.in, Options{})
			require.Error(t, err)
			assert.ErrorIs(t, err, tc.cause)
			if tc.row {
				var re *RowError
				require.True(t, errors.As(err, &re), "%v", err)
				assert.Equal(t, tc.line, re.Line)
				return
			}
			var se *SyntaxError
			if errors.As(err, &se) {
				assert.Equal(t, tc.line, se.Line, "%v", err)
				assert.Positive(t, se.Column)
			}
		})
	}
}

func TestXESSkip(t *testing.T) {
	in := `<log><trace><string key="concept:name" value="c"/>
<event><string key="concept:name" value="a"/><date key="time:timestamp" value="2024-01-01T00:00:00Z"/></event>
<event><string key="concept:name" value="b"/><date key="time:timestamp" value="bad"/></event>
</trace></log>`
	l, rep, err := readString(t, in, Options{OnError: Skip})
	require.NoError(t, err)
	assert.Equal(t, 1, l.NumEvents())
	assert.Equal(t, 1, rep.Problems.Skipped)
	assert.Equal(t, 3, rep.Problems.First[0].Line)
}

// TestXESValuesOutliveTheirTrace: a trace's values are read into an arena that the next trace
// writes over, so everything kept of them must be a copy. Many traces with values of the same
// lengths (which an overwrite would not show by length), kept as case ids, activities,
// resources, attribute values and the text of a set-aside event, must read back unchanged.
func TestXESValuesOutliveTheirTrace(t *testing.T) {
	var b strings.Builder
	b.WriteString("<log>")
	for i := range 300 {
		b.WriteString("<trace>")
		if i == 0 { // first, so that its text sits where the next trace's values go
			b.WriteString(`<event><string key="concept:name" value="x"/><date key="time:timestamp" value="not-a-time"/></event>`)
		}
		fmt.Fprintf(&b, `<string key="concept:name" value="case-%03d"/><string key="region" value="r-%03d"/>`, i, i)
		fmt.Fprintf(&b, `<event><string key="concept:name" value="act-%03d"/><string key="org:resource" value="res-%03d"/>`, i%7, i%5)
		fmt.Fprintf(&b, `<int key="amount" value="%d"/><date key="time:timestamp" value="2024-01-01T00:%02d:00Z"/></event>`, 1000+i, i%60)
		b.WriteString("</trace>")
	}
	b.WriteString("</log>")
	l, rep, err := readString(t, b.String(), Options{OnError: Skip})
	require.NoError(t, err)
	require.Equal(t, 300, l.NumCases())
	region, amount := l.CaseAttr("region"), l.EventAttr("amount")
	require.NotNil(t, region)
	require.NotNil(t, amount)
	for c := range 300 {
		i, err := strconv.Atoi(strings.TrimPrefix(l.CaseID(c), "case-"))
		require.NoError(t, err, l.CaseID(c))
		v, _ := region.Text(c)
		assert.Equal(t, fmt.Sprintf("r-%03d", i), v)
		ev := int(l.CaseStart[c])
		assert.Equal(t, fmt.Sprintf("act-%03d", i%7), l.Activities.Name(l.Act[ev]))
		assert.Equal(t, fmt.Sprintf("res-%03d", i%5), l.Resources.Name(l.Res[ev]))
		a, _ := amount.Text(ev)
		assert.Equal(t, strconv.Itoa(1000+i), a)
	}
	require.Equal(t, 1, rep.Problems.Skipped)
	assert.Equal(t, "not-a-time", rep.Problems.First[0].Value)
}

func TestXESLatin1Declared(t *testing.T) {
	in := "<?xml version=\"1.0\" encoding=\"ISO-8859-1\"?>\n<log><trace><string key=\"concept:name\" value=\"c\"/><event><string key=\"concept:name\" value=\"Pr\xfcfen\"/></event></trace></log>"
	l, _, err := readString(t, in, Options{})
	require.NoError(t, err)
	assert.Equal(t, "Prüfen", traces(l)["c"])
}

func FuzzReadXES(f *testing.F) {
	seed, _ := os.ReadFile("../../testdata/standard.xes")
	f.Add(string(seed))
	f.Add(`<log><trace><event><string key="concept:name" value="a"/></event></trace></log>`)
	f.Add(`<log><trace><event><list key="l"><values><int key="x" value="1"/></values></list></event></trace></log>`)
	f.Fuzz(func(t *testing.T, in string) {
		l, _, err := Read(context.Background(), strings.NewReader(in), Options{OnError: Skip})
		if err == nil {
			assert.GreaterOrEqual(t, l.NumCases(), 0)
		}
	})
}

// TestEmptyListOnTrace: an empty list on a trace stays a list through a round trip of its text.
func TestEmptyListOnTrace(t *testing.T) {
	in := `<log><trace><string key="concept:name" value="c"/><list key="l"/><event><string key="concept:name" value="a"/></event></trace></log>`
	l, _, err := readString(t, in, Options{})
	require.NoError(t, err)
	col := l.CaseAttr("l")
	require.NotNil(t, col)
	assert.Equal(t, eventlog.KindNested, col.Kind)
	text, _ := col.Text(0)
	n, err := eventlog.ParseNested(text)
	require.NoError(t, err)
	assert.Equal(t, "list", n.Type)
}

// encodingDeclRE is the regular expression encodingName replaced: the reference it must agree
// with, on the table below and under FuzzEncodingName.
var encodingDeclRE = regexp.MustCompile(`^\s*<\?xml[^>]*?encoding\s*=\s*["']([A-Za-z0-9._-]+)["']`)

func checkEncodingName(t *testing.T, head string) {
	t.Helper()
	name, at := encodingName([]byte(head))
	m := encodingDeclRE.FindSubmatchIndex([]byte(head))
	if m == nil {
		assert.Equal(t, -1, at, "%q", head)
		return
	}
	assert.Equal(t, head[m[2]:m[3]], string(name), "%q", head)
	assert.Equal(t, m[2], at, "%q", head)
}

func TestEncodingName(t *testing.T) {
	for _, head := range []string{
		`<?xml version="1.0" encoding="UTF-8"?><log/>`,
		"  \n<?xml version='1.0' encoding = 'windows-1252' ?>",
		`<?xml version="1.0"?><log encoding="x"/>`, // after the declaration's end: not it
		`<?xml encoding=UTF-8?>`,                   // unquoted
		`<?xml encodingx="a" encoding="b"?>`,       // the first "encoding" fails, the second fits
		`<?xml encoding="a b"?>`, `<?xml version="1.0" encoding="ISO-8859-1"`, `<log/>`, ``, `<?xm`,
	} {
		checkEncodingName(t, head)
	}
}

func FuzzEncodingName(f *testing.F) {
	f.Add(`<?xml version="1.0" encoding="UTF-8"?>`)
	f.Add(`<?xml encodingx="a" encoding='b'>`)
	f.Fuzz(func(t *testing.T, head string) { checkEncodingName(t, head) })
}
