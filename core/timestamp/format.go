package timestamp

import (
	"errors"
	"fmt"
	"math"
)

// NoTime marks a missing timestamp in an int64 column. It sorts before every real time.
const NoTime int64 = math.MinInt64

// ErrLayout is the cause of every error from ParseFormat.
var ErrLayout = errors.New("timestamp: bad layout")

type itemKind uint8

const (
	itLit itemKind = iota
	itYear
	itMonth2
	itMonth
	itDay2
	itDay
	itHour2
	itHour
	itMin
	itSec
	itFrac
	itZone
	itAMPM
	itMonthName
	itYear2
	itWeekday
	itGroup
)

type item struct {
	kind  itemKind
	lit   byte
	group []item
}

// Format is a compiled layout. It is immutable and safe for concurrent use.
type Format struct {
	layout string
	items  []item
	epoch  int64 // 0 for a date layout; else microseconds per unit (1e6 for seconds, 1e3 for ms)
	ampm   bool
	iso    byte // 'T' or ' ' for the two ISO 8601 candidates, which get a fixed-offset fast path
}

// String returns the layout the format was compiled from.
func (f *Format) String() string { return f.layout }

// MarshalText writes the layout, so a Format shows as text in JSON.
func (f *Format) MarshalText() ([]byte, error) { return []byte(f.layout), nil }

// ParseFormat compiles a layout (see the package doc).
func ParseFormat(layout string) (*Format, error) {
	switch layout {
	case "epoch-s":
		return &Format{layout: layout, epoch: 1e6}, nil
	case "epoch-ms":
		return &Format{layout: layout, epoch: 1e3}, nil
	}
	f := &Format{layout: layout}
	items, rest, err := compile(layout, 0, f)
	if err != nil {
		return nil, err
	}
	if rest != len(layout) {
		return nil, fmt.Errorf("%w %q: unmatched ']' at byte %d", ErrLayout, layout, rest+1)
	}
	var seen [itGroup]bool
	mark(items, &seen)
	if !(seen[itYear] || seen[itYear2]) || !(seen[itMonth] || seen[itMonth2] || seen[itMonthName]) || !(seen[itDay] || seen[itDay2]) {
		return nil, fmt.Errorf("%w %q: needs a year (YYYY or YY), a month (MM, M or MMM) and a day (DD or D)", ErrLayout, layout)
	}
	if f.ampm && seen[itHour2] {
		return nil, fmt.Errorf("%w %q: AP goes with h (1-12), not hh", ErrLayout, layout)
	}
	f.items = items
	switch layout {
	case "YYYY-MM-DDThh:mm[:ss[.f]][Z]":
		f.iso = 'T'
	case "YYYY-MM-DD hh:mm[:ss[.f]][Z]":
		f.iso = ' '
	}
	return f, nil
}

func mark(items []item, seen *[itGroup]bool) {
	for _, it := range items {
		if it.kind == itGroup {
			mark(it.group, seen)
		} else if it.kind != itLit {
			seen[it.kind] = true
		}
	}
}

var tokens = []struct {
	text string
	kind itemKind
}{
	{"YYYY", itYear}, {"YY", itYear2}, {"MMM", itMonthName}, {"MM", itMonth2}, {"M", itMonth},
	{"WWW", itWeekday}, {"DD", itDay2}, {"D", itDay},
	{"hh", itHour2}, {"h", itHour}, {"mm", itMin}, {"ss", itSec}, {".f", itFrac}, {",f", itFrac},
	{"AP", itAMPM}, {"Z", itZone},
}

func compile(layout string, i int, f *Format) ([]item, int, error) {
	var items []item
	for i < len(layout) {
		switch layout[i] {
		case '[':
			g, j, err := compile(layout, i+1, f)
			if err != nil {
				return nil, 0, err
			}
			if j >= len(layout) || layout[j] != ']' {
				return nil, 0, fmt.Errorf("%w %q: '[' at byte %d is not closed", ErrLayout, layout, i+1)
			}
			items = append(items, item{kind: itGroup, group: g})
			i = j + 1
			continue
		case ']':
			return items, i, nil
		}
		matched := false
		for _, t := range tokens {
			if len(layout)-i >= len(t.text) && layout[i:i+len(t.text)] == t.text {
				items = append(items, item{kind: t.kind})
				if t.kind == itAMPM {
					f.ampm = true
				}
				i += len(t.text)
				matched = true
				break
			}
		}
		if !matched {
			items = append(items, item{kind: itLit, lit: layout[i]})
			i++
		}
	}
	return items, i, nil
}

// fields collects what a parse has read so far.
type fields struct {
	year, month, day, hour, min, sec int64
	frac                             int64 // microseconds
	zone                             int64 // offset east of UTC in seconds
	pm, am                           bool
}

// Parse reads b as a time under the format and returns Unix microseconds. It allocates nothing.
// The whole of b must match; leading and trailing spaces are ignored.
func (f *Format) Parse(b []byte) (int64, bool) {
	b = trimSpace(b)
	if len(b) == 0 {
		return 0, false
	}
	if f.epoch != 0 {
		return parseEpoch(b, f.epoch)
	}
	if f.iso != 0 && len(b) == 19 {
		if t, ok := parseISOSeconds(b, f.iso); ok {
			return t, true
		}
	}
	var v fields
	v.month, v.day = 1, 1
	n, ok := match(f.items, b, 0, &v)
	if !ok || n != len(b) {
		return 0, false
	}
	return v.unix(f.ampm)
}

// ParseString is Parse for a string.
func (f *Format) ParseString(s string) (int64, bool) {
	return f.Parse([]byte(s))
}

func trimSpace(b []byte) []byte {
	for len(b) > 0 && (b[0] == ' ' || b[0] == '\t') {
		b = b[1:]
	}
	for len(b) > 0 && (b[len(b)-1] == ' ' || b[len(b)-1] == '\t' || b[len(b)-1] == '\r') {
		b = b[:len(b)-1]
	}
	return b
}

// digits reads between min and max decimal digits at b[i:].
func digits(b []byte, i, min, max int) (int64, int, bool) {
	var v int64
	j := i
	for j < len(b) && j-i < max && b[j] >= '0' && b[j] <= '9' {
		v = v*10 + int64(b[j]-'0')
		j++
	}
	if j-i < min {
		return 0, i, false
	}
	return v, j, true
}

func match(items []item, b []byte, i int, v *fields) (int, bool) {
	var ok bool
	for _, it := range items {
		switch it.kind {
		case itLit:
			if i >= len(b) || b[i] != it.lit {
				return i, false
			}
			i++
		case itGroup:
			save := *v
			if j, gok := match(it.group, b, i, v); gok {
				i = j
			} else {
				*v = save
			}
		case itYear:
			v.year, i, ok = digits(b, i, 4, 4)
		case itYear2:
			// POSIX strptime's %y: 69-99 are 1969-1999, 00-68 are 2000-2068 (IEEE Std 1003.1)
			if v.year, i, ok = digits(b, i, 2, 2); ok {
				if v.year >= 69 {
					v.year += 1900
				} else {
					v.year += 2000
				}
			}
		case itMonthName:
			v.month, i, ok = monthName(b, i)
		case itWeekday:
			i, ok = weekdayName(b, i)
		case itMonth2:
			v.month, i, ok = digits(b, i, 2, 2)
		case itMonth:
			v.month, i, ok = digits(b, i, 1, 2)
		case itDay2:
			v.day, i, ok = digits(b, i, 2, 2)
		case itDay:
			v.day, i, ok = digits(b, i, 1, 2)
		case itHour2:
			v.hour, i, ok = digits(b, i, 2, 2)
		case itHour:
			v.hour, i, ok = digits(b, i, 1, 2)
		case itMin:
			v.min, i, ok = digits(b, i, 2, 2)
		case itSec:
			v.sec, i, ok = digits(b, i, 2, 2)
		case itFrac:
			if i >= len(b) || (b[i] != '.' && b[i] != ',') {
				return i, false
			}
			var d int64
			start := i + 1
			d, i, ok = digits(b, start, 1, 9)
			for k := i - start; k < 6; k++ {
				d *= 10
			}
			for k := i - start; k > 6; k-- {
				d /= 10
			}
			v.frac = d
		case itZone:
			i, ok = zone(b, i, v)
		case itAMPM:
			if i+2 > len(b) {
				return i, false
			}
			switch b[i] | 0x20 {
			case 'a':
				v.am = true
			case 'p':
				v.pm = true
			default:
				return i, false
			}
			if b[i+1]|0x20 != 'm' {
				return i, false
			}
			i += 2
			ok = true
		}
		if it.kind != itLit && it.kind != itGroup && !ok {
			return i, false
		}
	}
	return i, true
}

func zone(b []byte, i int, v *fields) (int, bool) {
	if i >= len(b) {
		return i, false
	}
	if b[i] == 'Z' || b[i] == 'z' {
		return i + 1, true
	}
	if b[i] != '+' && b[i] != '-' {
		// RFC 5322 section 4.3 (obsolete zones): UT and GMT are +0000; UTC is its common spelling
		for _, name := range [...]string{"utc", "gmt", "ut"} {
			if len(b)-i >= len(name) && lowerIs(b[i:i+len(name)], name) {
				return i + len(name), true
			}
		}
		return i, false
	}
	sign := int64(1)
	if b[i] == '-' {
		sign = -1
	}
	h, j, ok := digits(b, i+1, 2, 2)
	if !ok || h > 23 {
		return i, false
	}
	var m int64
	if j < len(b) && b[j] == ':' {
		if m, j, ok = digits(b, j+1, 2, 2); !ok {
			return i, false
		}
	} else if j+2 <= len(b) && b[j] >= '0' && b[j] <= '9' {
		if m, j, ok = digits(b, j, 2, 2); !ok {
			return i, false
		}
	}
	if m > 59 {
		return i, false
	}
	v.zone = sign * (h*3600 + m*60)
	return j, true
}

// lowerIs reports whether b, its ASCII letters lowered, is s (lower case).
func lowerIs(b []byte, s string) bool {
	for k := range b {
		if b[k]|0x20 != s[k] {
			return false
		}
	}
	return true
}

func (v *fields) unix(ampm bool) (int64, bool) {
	if v.month < 1 || v.month > 12 || v.day < 1 || v.day > daysIn(v.year, v.month) {
		return 0, false
	}
	if ampm {
		if v.hour < 1 || v.hour > 12 {
			return 0, false
		}
		if v.pm && v.hour != 12 {
			v.hour += 12
		} else if v.am && v.hour == 12 {
			v.hour = 0
		}
	}
	// 24:00:00 is the end of the day (ISO 8601); second 60 is a leap second (RFC 3339).
	if v.hour > 24 || v.min > 59 || v.sec > 60 || (v.hour == 24 && (v.min != 0 || v.sec != 0 || v.frac != 0)) {
		return 0, false
	}
	secs := daysFromCivil(v.year, v.month, v.day)*86400 + v.hour*3600 + v.min*60 + v.sec - v.zone
	return secs*1e6 + v.frac, true
}

func daysIn(y, m int64) int64 {
	switch m {
	case 2:
		if y%4 == 0 && (y%100 != 0 || y%400 == 0) {
			return 29
		}
		return 28
	case 4, 6, 9, 11:
		return 30
	}
	return 31
}

// daysFromCivil counts days from 1970-01-01 to the proleptic Gregorian date y-m-d, after
// H. Hinnant, "chrono-Compatible Low-Level Date Algorithms" (days_from_civil).
func daysFromCivil(y, m, d int64) int64 {
	if m <= 2 {
		y--
	}
	era := y / 400
	if y < 0 && y%400 != 0 {
		era--
	}
	yoe := y - era*400
	mp := (m + 9) % 12
	doy := (153*mp+2)/5 + d - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return era*146097 + doe - 719468
}

func parseEpoch(b []byte, unit int64) (int64, bool) {
	neg := false
	if b[0] == '-' {
		neg = true
		b = b[1:]
	}
	whole, i, ok := digits(b, 0, 1, 16)
	if !ok {
		return 0, false
	}
	var frac int64
	if i < len(b) && b[i] == '.' {
		var d int64
		start := i + 1
		d, i, ok = digits(b, start, 1, 9)
		if !ok {
			return 0, false
		}
		// d has i-start digits: d / 10^(i-start) units, in microseconds.
		den := int64(1)
		for k := 0; k < i-start; k++ {
			den *= 10
		}
		frac = d * unit / den
	}
	if i != len(b) {
		return 0, false
	}
	if whole > math.MaxInt64/unit-1 {
		return 0, false
	}
	t := whole*unit + frac
	if neg {
		t = -t
	}
	return t, true
}

// parseISOSeconds reads exactly "YYYY-MM-DD?hh:mm:ss" (? is sep), the commonest timestamp of
// exports, at fixed offsets: about three times faster than the general matcher on the intake
// benchmark. Anything else falls back to the matcher, which gives the same result. It calls
// nothing (daysIn is inlined): a call is dear in Go's wasm code, and this runs once a row.
func parseISOSeconds(b []byte, sep byte) (int64, bool) {
	if b[4] != '-' || b[7] != '-' || b[10] != sep || b[13] != ':' || b[16] != ':' {
		return 0, false
	}
	_ = b[18]
	d0, d1, d2, d3 := b[0]-'0', b[1]-'0', b[2]-'0', b[3]-'0'
	m0, m1, dd0, dd1 := b[5]-'0', b[6]-'0', b[8]-'0', b[9]-'0'
	h0, h1, n0, n1, s0, s1 := b[11]-'0', b[12]-'0', b[14]-'0', b[15]-'0', b[17]-'0', b[18]-'0'
	// a byte below '0' wraps around to a large value, so one comparison per digit suffices
	if d0 > 9 || d1 > 9 || d2 > 9 || d3 > 9 || m0 > 9 || m1 > 9 || dd0 > 9 || dd1 > 9 ||
		h0 > 9 || h1 > 9 || n0 > 9 || n1 > 9 || s0 > 9 || s1 > 9 {
		return 0, false
	}
	y := int64(d0)*1000 + int64(d1)*100 + int64(d2)*10 + int64(d3)
	m, d := int64(m0)*10+int64(m1), int64(dd0)*10+int64(dd1)
	hh, mm, ss := int64(h0)*10+int64(h1), int64(n0)*10+int64(n1), int64(s0)*10+int64(s1)
	if m < 1 || m > 12 || d < 1 || d > daysIn(y, m) {
		return 0, false
	}
	// as fields.unix: 24:00:00 is the end of the day, second 60 a leap second
	if hh > 24 || mm > 59 || ss > 60 || (hh == 24 && (mm != 0 || ss != 0)) {
		return 0, false
	}
	// daysFromCivil for the years 0 to 9999, moved on by one era of 400 years so that the year
	// is never negative and the division needs no correction
	if m <= 2 {
		y--
		m += 12
	}
	y += 400
	era := y / 400
	yoe := y - era*400
	doy := (153*(m-3)+2)/5 + d - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	days := (era-1)*146097 + doe - 719468
	return (days*86400 + hh*3600 + mm*60 + ss) * 1e6, true
}
