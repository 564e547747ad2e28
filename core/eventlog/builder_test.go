package eventlog

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

type ev struct {
	c, a, res, life string
	t               int64
}

func build(t *testing.T, evs []ev, opt BuildOptions, attrs map[string][]string) *Log {
	t.Helper()
	b := NewBuilder()
	for i, e := range evs {
		lc, err := b.Lifecycle([]byte(e.life))
		require.NoError(t, err)
		idx, err := b.Add(Event{Case: b.Case([]byte(e.c)), Activity: b.Activity([]byte(e.a)),
			Resource: b.Resource([]byte(e.res)), Time: e.t, Life: lc, Row: int32(i + 2)})
		require.NoError(t, err)
		for _, key := range sortedKeys(attrs) {
			if v := attrs[key][i]; v != "" {
				b.SetEventValue(b.EventColumn(key, KindUnknown), idx, []byte(v))
			}
		}
	}
	l, err := b.Build(opt)
	require.NoError(t, err)
	return l
}

func sortedKeys(m map[string][]string) []string {
	var ks []string
	for k := range m {
		ks = append(ks, k)
	}
	for i := range ks {
		for j := i + 1; j < len(ks); j++ {
			if ks[j] < ks[i] {
				ks[i], ks[j] = ks[j], ks[i]
			}
		}
	}
	return ks
}

func names(l *Log, ids []int32) []string {
	out := make([]string, len(ids))
	for i, id := range ids {
		out[i] = l.Activities.Name(id)
	}
	return out
}

func TestGroupingAndOrder(t *testing.T) {
	// Rows of two cases interleaved and out of time order; b and c of case 1 share a timestamp
	// and must keep their file order (stable sort, as the issue requires).
	l := build(t, []ev{
		{c: "1", a: "d", t: 40}, {c: "2", a: "a", t: 5}, {c: "1", a: "a", t: 10},
		{c: "1", a: "b", t: 20}, {c: "1", a: "c", t: 20}, {c: "2", a: "b", t: 6},
	}, BuildOptions{}, nil)
	require.Equal(t, 2, l.NumCases())
	assert.Equal(t, "1", l.CaseID(0), "cases keep the order of first appearance")
	assert.Equal(t, []string{"a", "b", "c", "d"}, names(l, l.Trace(0)))
	assert.Equal(t, []string{"a", "b"}, names(l, l.Trace(1)))
	assert.Equal(t, []int32{4, 5, 6, 2}, l.Row[:4], "rows follow their events")
	assert.Nil(t, l.InstFirst, "no lifecycle: instances are events")
	first, last, ok := l.CaseSpan(0)
	assert.True(t, ok)
	assert.Equal(t, int64(10), first)
	assert.Equal(t, int64(40), last)
}

func TestUntimedEventsKeepTheirPlace(t *testing.T) {
	l := build(t, []ev{
		{c: "1", a: "a", t: 30}, {c: "1", a: "x", t: NoTime}, {c: "1", a: "b", t: 10},
	}, BuildOptions{}, nil)
	// x follows a in the file and has no time: it moves with a.
	assert.Equal(t, []string{"b", "a", "x"}, names(l, l.Trace(0)))
	assert.Equal(t, 1, l.Untimed)
}

func TestLifecyclePairing(t *testing.T) {
	// Two overlapping instances of a (FIFO pairing), a suspend that forms no instance, a start
	// never completed, a complete with no start.
	l := build(t, []ev{
		{c: "1", a: "a", life: "start", t: 1},
		{c: "1", a: "a", life: "start", t: 2},
		{c: "1", a: "b", life: "complete", t: 3},
		{c: "1", a: "a", life: "suspend", t: 4},
		{c: "1", a: "a", life: "complete", t: 5},
		{c: "1", a: "a", life: "complete", t: 6},
		{c: "1", a: "c", life: "start", t: 7},
	}, BuildOptions{}, nil)
	require.NotNil(t, l.InstFirst)
	assert.Equal(t, []string{"a", "a", "b", "c"}, names(l, l.Trace(0)))
	assert.Equal(t, []int32{0, 1, 2, 6}, l.InstFirst)
	assert.Equal(t, []int32{4, 5, 2, 6}, l.InstLast)
}

func TestVariants(t *testing.T) {
	l := build(t, []ev{
		{c: "1", a: "a", t: 1}, {c: "1", a: "b", t: 2},
		{c: "2", a: "a", t: 1}, {c: "2", a: "c", t: 2},
		{c: "3", a: "a", t: 1}, {c: "3", a: "c", t: 2},
	}, BuildOptions{}, nil)
	require.Len(t, l.Variants, 2)
	assert.Equal(t, []string{"a", "c"}, names(l, l.Variants[0].Activities), "most frequent first")
	assert.Equal(t, []int32{1, 2}, l.Variants[0].Cases)
	assert.Equal(t, []int32{1, 0, 0}, l.CaseVariant)
}

// eventKinds maps each event attribute of l to the kind it was typed as.
func eventKinds(l *Log) map[string]Kind {
	kinds := map[string]Kind{}
	for _, c := range l.EventAttrs {
		kinds[c.Key] = c.Kind
	}
	return kinds
}

// TestDecimalComma: numbers written with a decimal comma, as spreadsheets in much of Europe
// export them, are numbers; a column whose every comma is followed by three digits could be
// thousands and stays text, as do codes with a leading zero (common practice of such exports).
func TestDecimalComma(t *testing.T) {
	evs := []ev{{c: "1", a: "a", t: 1}, {c: "1", a: "b", t: 2}, {c: "2", a: "a", t: 3}, {c: "2", a: "b", t: 4}}
	l := build(t, evs, BuildOptions{}, map[string][]string{
		"cost":      {"12,5", "3", "-0,25", "1,250"},
		"thousands": {"1,250", "2,500", "3", "4"},
		"code":      {"01,5", "2,5", "3", "4"},
		"mixed":     {"1.5", "2,5", "3", "4"},
	})
	kinds := eventKinds(l)
	assert.Equal(t, map[string]Kind{"cost": KindNumber, "thousands": KindString, "code": KindString, "mixed": KindString}, kinds)
	assert.Equal(t, []float64{12.5, 3, -0.25, 1.25}, l.EventAttr("cost").Num)
	txt, _ := l.EventAttr("cost").Text(0)
	assert.Equal(t, "12,5", txt, "the text is kept as written")
}

func TestAttributeTyping(t *testing.T) {
	evs := []ev{{c: "1", a: "a", t: 1}, {c: "1", a: "b", t: 2}, {c: "2", a: "a", t: 3}, {c: "2", a: "b", t: 4}}
	l := build(t, evs, BuildOptions{LiftCaseAttributes: true}, map[string][]string{
		"amount":  {"1.50", "2", "", "-3e2"},
		"code":    {"007", "12", "1", "2"},
		"urgent":  {"true", "FALSE", "true", "false"},
		"due":     {"2024-01-05", "2024-01-06", "2024-01-07", "2024-01-08"},
		"region":  {"north", "north", "south", "south"},
		"comment": {"x", "", "y", "z"},
	})
	kinds := eventKinds(l)
	assert.Equal(t, map[string]Kind{"amount": KindNumber, "code": KindString, "urgent": KindBool,
		"due": KindTime, "comment": KindString}, kinds)
	region := l.CaseAttr("region")
	require.NotNil(t, region, "a value constant within each case is lifted to the case")
	assert.Equal(t, []string{"north", "south"}, []string{region.Dict.Name(region.Str[0]), region.Dict.Name(region.Str[1])})
	amount := l.EventAttr("amount")
	assert.Equal(t, 1.5, amount.Num[0])
	assert.True(t, math.IsNaN(amount.Num[2]))
	txt, ok := amount.Text(0)
	assert.True(t, ok)
	assert.Equal(t, "1.50", txt, "typing keeps the text as written")
	assert.Equal(t, []int8{1, 0, 1, 0}, l.EventAttr("urgent").Bool)
}

func TestDeclaredKindsThatLie(t *testing.T) {
	b := NewBuilder()
	c := b.Case([]byte("1"))
	for i, v := range []string{"12", "abc"} {
		idx, _ := b.Add(Event{Case: c, Activity: b.Activity([]byte("a")), Time: int64(i), Resource: -1})
		b.SetEventValue(b.EventColumn("n", KindNumber), idx, []byte(v))
	}
	idx, _ := b.Add(Event{Case: c, Activity: b.Activity([]byte("a")), Time: 5, Resource: -1})
	b.SetEventValue(b.EventColumn("m", KindNumber), idx, []byte("1"))
	b.SetEventValue(b.EventColumn("m", KindBool), idx, []byte("true"))
	l, err := b.Build(BuildOptions{})
	require.NoError(t, err)
	assert.Equal(t, KindString, l.EventAttr("n").Kind, "a value that is no number keeps the column as text")
	assert.Equal(t, KindString, l.EventAttr("m").Kind, "mixed declarations keep the column as text")
}

// TestOrderAgainstStableSort checks the order within cases against the rule stated plainly: a
// stable sort of each case's events, in file order, by their time, an event without one taking
// the time of the event before it (reference: sort.SliceStable). Cases of 1 to 80 events cross
// the switch from insertion sort to sort.Stable at 32; times repeat, and some are missing.
func TestOrderAgainstStableSort(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	type row struct {
		c    string
		t    int64
		line int32
	}
	var rows []row
	for c := range 60 {
		for range 1 + r.IntN(80) {
			tm := int64(r.IntN(20))
			if r.IntN(6) == 0 {
				tm = NoTime
			}
			rows = append(rows, row{c: fmt.Sprint(c), t: tm})
		}
	}
	r.Shuffle(len(rows), func(i, j int) { rows[i], rows[j] = rows[j], rows[i] })
	b := NewBuilder()
	for i := range rows {
		rows[i].line = int32(i + 2)
		_, err := b.Add(Event{Case: b.Case([]byte(rows[i].c)), Activity: b.Activity([]byte("a")), Resource: -1, Time: rows[i].t, Row: rows[i].line})
		require.NoError(t, err)
	}
	l, err := b.Build(BuildOptions{})
	require.NoError(t, err)
	for c := range l.NumCases() {
		var want []row
		for _, rw := range rows {
			if rw.c == l.Cases.Name(int32(c)) {
				want = append(want, rw)
			}
		}
		keys := make(map[int32]int64)
		k := NoTime
		for _, rw := range want {
			if rw.t != NoTime {
				k = rw.t
			}
			keys[rw.line] = k
		}
		sort.SliceStable(want, func(i, j int) bool { return keys[want[i].line] < keys[want[j].line] })
		from, to := l.Events(c)
		require.Equal(t, len(want), to-from)
		for i, rw := range want {
			assert.Equal(t, rw.line, l.Row[from+i], "case %d event %d", c, i)
			assert.Equal(t, rw.t, l.Time[from+i], "case %d event %d", c, i)
		}
	}
}
