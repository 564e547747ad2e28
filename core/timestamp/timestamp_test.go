package timestamp

import (
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func micro(t *testing.T, layout, value string) int64 {
	t.Helper()
	tm, err := time.Parse(layout, value)
	require.NoError(t, err)
	return tm.UnixMicro()
}

// TestRFC3339Examples checks the examples of RFC 3339 (Klyne and Newman 2002), section 5.8,
// against the Go standard library's time.Parse as the reference reading.
func TestRFC3339Examples(t *testing.T) {
	f, err := ParseFormat("YYYY-MM-DDThh:mm[:ss[.f]][Z]")
	require.NoError(t, err)
	for _, tc := range []struct{ name, in string }{
		{"fraction and Z", "1985-04-12T23:20:50.52Z"},
		{"negative offset", "1996-12-19T16:39:57-08:00"},
		{"odd offset", "1937-01-01T12:00:27.87+00:20"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, ok := f.ParseString(tc.in)
			require.True(t, ok)
			assert.Equal(t, micro(t, time.RFC3339Nano, tc.in), got)
		})
	}
	// RFC 3339 section 5.8: "1990-12-31T23:59:60Z" is the leap second at the end of 1990; time.Parse
	// refuses it, and we read it as the instant one second after 23:59:59.
	got, ok := f.ParseString("1990-12-31T23:59:60Z")
	require.True(t, ok)
	assert.Equal(t, micro(t, time.RFC3339, "1991-01-01T00:00:00Z"), got)
	// Section 5.8, the same leap second written in US Pacific time.
	got2, ok := f.ParseString("1990-12-31T15:59:60-08:00")
	require.True(t, ok)
	assert.Equal(t, got, got2)
}

// TestXSDateTime checks forms of xs:dateTime (W3C XML Schema Part 2, 2004, section 3.2.7), the
// type of XES date attributes (IEEE 1849-2016, section 5.3.3).
func TestXSDateTime(t *testing.T) {
	f, err := ParseFormat("YYYY-MM-DDThh:mm[:ss[.f]][Z]")
	require.NoError(t, err)
	for _, tc := range []struct{ name, in, want string }{
		// Section 3.2.7.4 (order relation): 2002-10-10T12:00:00-05:00 is 2002-10-10T17:00:00Z.
		{"offset", "2002-10-10T12:00:00-05:00", "2002-10-10T17:00:00Z"},
		// Section 3.2.7: "2002-10-10T24:00:00" (end of day) is the next day's midnight (1.0 errata; ISO 8601 also allows it).
		{"end of day", "2002-10-10T24:00:00Z", "2002-10-11T00:00:00Z"},
		{"no zone read as UTC", "2002-10-10T12:00:00", "2002-10-10T12:00:00Z"},
		{"millis", "2010-12-30T11:02:00.000+01:00", "2010-12-30T10:02:00Z"},
		{"nanos truncated to micros", "2010-12-30T11:02:00.123456789Z", "2010-12-30T11:02:00.123456Z"},
		{"leap day", "2024-02-29T00:00:00Z", "2024-02-29T00:00:00Z"},
		{"before 1970", "1901-12-13T20:45:52Z", "1901-12-13T20:45:52Z"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, ok := f.ParseString(tc.in)
			require.True(t, ok)
			assert.Equal(t, micro(t, time.RFC3339Nano, tc.want), got)
			assert.Equal(t, tc.want, FormatRFC3339(got))
		})
	}
	for _, bad := range []string{"2023-02-29T00:00:00Z", "2024-13-01T00:00:00Z", "2024-01-01T25:00:00Z",
		"2024-01-01T24:00:01Z", "2024-01-01T10:60:00Z", "2024-01-01T10:00:00+25:00", "2024-1-01T10:00:00Z",
		"2024-01-01T10:00:00Zjunk", "", "   "} {
		_, ok := f.ParseString(bad)
		assert.False(t, ok, bad)
	}
}

func TestLayouts(t *testing.T) {
	for _, tc := range []struct{ layout, in, want string }{
		{"YYYY-MM-DD hh:mm[:ss]", "2024-03-05 07:08", "2024-03-05T07:08:00Z"},
		{"YYYY-MM-DD hh:mm[:ss]", "2024-03-05 07:08:09", "2024-03-05T07:08:09Z"},
		{"D.M.YYYY[ h:mm[:ss]]", "5.3.2024 7:08", "2024-03-05T07:08:00Z"},
		{"D/M/YYYY[ h:mm[:ss]]", "05/03/2024", "2024-03-05T00:00:00Z"},
		{"M/D/YYYY h:mm[:ss] AP", "3/5/2024 7:08 PM", "2024-03-05T19:08:00Z"},
		{"M/D/YYYY h:mm[:ss] AP", "3/5/2024 12:08:01 am", "2024-03-05T00:08:01Z"},
		{"M/D/YYYY h:mm[:ss] AP", "3/5/2024 12:00 PM", "2024-03-05T12:00:00Z"},
		{"YYYY-MM-DD hh:mm:ss,f", "2024-03-05 07:08:09,5", "2024-03-05T07:08:09.5Z"},
		{"YYYYMMDDhhmmss", "20240305070809", "2024-03-05T07:08:09Z"},
		{"YYYY-MM-DDThh:mm:ssZ", "2024-03-05T07:08:09+0130", "2024-03-05T05:38:09Z"},
		{"YYYY-MM-DDThh:mm:ssZ", "2024-03-05T07:08:09-01", "2024-03-05T08:08:09Z"},
		{"epoch-s", "1709622489", "2024-03-05T07:08:09Z"},
		{"epoch-s", "1709622489.25", "2024-03-05T07:08:09.25Z"},
		{"epoch-ms", "1709622489250", "2024-03-05T07:08:09.25Z"},
	} {
		t.Run(tc.layout+"/"+tc.in, func(t *testing.T) {
			f, err := ParseFormat(tc.layout)
			require.NoError(t, err)
			got, ok := f.ParseString(tc.in)
			require.True(t, ok)
			assert.Equal(t, tc.want, FormatRFC3339(got))
		})
	}
}

// TestMonthNames checks the named-month layouts against the Go standard library's time.Parse as
// the reference reading, on the date-time examples of RFC 5322 (Resnick 2008), appendix A.1.1
// and A.6.2 (two-digit year and "GMT", from its obsolete syntax, section 4.3), on Oracle's
// default DD-MON-RR dates, and on written English dates.
func TestMonthNames(t *testing.T) {
	for _, tc := range []struct{ layout, in, goLayout string }{
		{"WWW, D MMM YYYY hh:mm[:ss] Z", "Fri, 21 Nov 1997 09:55:06 -0600", time.RFC1123Z},
		{"WWW, D MMM YYYY hh:mm[:ss] Z", "Tue, 1 Jul 2003 10:52:37 +0200", "Mon, 2 Jan 2006 15:04:05 -0700"},
		{"D MMM YY hh:mm:ss Z", "21 Nov 97 09:55:06 GMT", "02 Jan 06 15:04:05 MST"},
		{"D-MMM-YY", "02-DEC-26", "02-Jan-06"},
		{"D-MMM-YY", "15-jan-69", "02-Jan-06"},
		{"D MMM YYYY[ h:mm[:ss[.f]]]", "5 Mar 2024 7:08", "2 Jan 2006 15:04"},
		{"D MMM YYYY[ h:mm[:ss[.f]]]", "05 September 2024", "02 January 2006"},
		{"MMM D, YYYY h:mm[:ss] AP", "Dec 2, 2026 8:15 AM", "Jan 2, 2006 3:04 PM"},
		{"MMM D, YYYY[ h:mm[:ss[.f]]]", "February 29, 2024 23:59:59.5", "January 2, 2006 15:04:05.0"},
	} {
		t.Run(tc.in, func(t *testing.T) {
			f, err := ParseFormat(tc.layout)
			require.NoError(t, err)
			got, ok := f.ParseString(tc.in)
			require.True(t, ok)
			assert.Equal(t, micro(t, tc.goLayout, tc.in), got)
		})
	}
	// Other languages, from the CLDR abbreviations (from memory; see names.go).
	f, err := ParseFormat("D[.] MMM YYYY[ h:mm]")
	require.NoError(t, err)
	for in, want := range map[string]string{
		"2. Dez. 2026 08:15": "2026-12-02T08:15:00Z", "3. März 2025": "2025-03-03T00:00:00Z",
		"2 févr. 2026": "2026-02-02T00:00:00Z", "14 juil. 2025": "2025-07-14T00:00:00Z", "15 aout 2025": "2025-08-15T00:00:00Z",
		"3 ene 2025": "2025-01-03T00:00:00Z", "1 gen 2025": "2025-01-01T00:00:00Z", "5 mrt 2024": "2024-03-05T00:00:00Z",
		"10 out 2024": "2024-10-10T00:00:00Z", "7 MEI 2024": "2024-05-07T00:00:00Z",
	} {
		got, ok := f.ParseString(in)
		if assert.True(t, ok, in) {
			assert.Equal(t, want, FormatRFC3339(got), in)
		}
	}
	for _, bad := range []string{"2 Foo 2026", "31 Feb 2024", "2 Decembers 2026", "2 12 2026", "2 . 2026"} {
		_, ok := f.ParseString(bad)
		assert.False(t, ok, bad)
	}
	w, _ := ParseFormat("WWW, D MMM YYYY hh:mm[:ss] Z")
	_, ok := w.ParseString("Fry, 21 Nov 1997 09:55:06 -0600")
	assert.False(t, ok, "not a weekday")
}

// TestNamesAreUnambiguous: no name stands for two months, and none is a weekday's.
func TestNamesAreUnambiguous(t *testing.T) {
	seen := map[string]int{}
	for m, names := range monthNameList {
		for _, n := range names {
			if prev, ok := seen[n]; ok && prev != m {
				t.Errorf("%q is month %d and %d", n, prev+1, m+1)
			}
			seen[n] = m
			assert.False(t, weekdayNames[n], n)
			assert.LessOrEqual(t, len(n), 16, n)
		}
	}
}

func TestBadLayouts(t *testing.T) {
	for _, l := range []string{"hh:mm", "YYYY-MM", "[YYYY-MM-DD", "YYYY-MM-DD]", "YYYY-MM-DD hh AP"} {
		_, err := ParseFormat(l)
		assert.ErrorIs(t, err, ErrLayout, l)
	}
}

func TestInfer(t *testing.T) {
	for _, tc := range []struct {
		name      string
		sample    []string
		want      string
		ambiguous bool
	}{
		{"iso", []string{"2024-03-05T07:08:09Z", "2024-03-06T10:00:00.5+01:00"}, "YYYY-MM-DDThh:mm[:ss[.f]][Z]", false},
		{"iso space", []string{"2024-03-05 07:08:09", "2024-03-06 10:00"}, "YYYY-MM-DD hh:mm[:ss[.f]][Z]", false},
		{"day first by sample", []string{"05/03/2024 10:00", "25/03/2024 11:00"}, "D/M/YYYY[ h:mm[:ss[.f]]]", false},
		{"month first by sample", []string{"03/05/2024 10:00", "03/25/2024 11:00"}, "M/D/YYYY[ h:mm[:ss[.f]]]", false},
		{"ambiguous", []string{"05/03/2024", "06/03/2024"}, "D/M/YYYY[ h:mm[:ss[.f]]]", true},
		{"german", []string{"5.3.2024 10:00", "31.12.2024 23:59:59"}, "D.M.YYYY[ h:mm[:ss[.f]]]", false},
		{"epoch seconds", []string{"1709622489", "1709622600"}, "epoch-s", false},
		{"epoch millis", []string{"1709622489000", "1709622600123"}, "epoch-ms", false},
		{"amounts are not epochs", []string{"1200", "15"}, "", false},
		{"one bad value in twenty still infers", append(repeat("2024-03-05", 19), "n/a"), "YYYY-MM-DD", false},
		{"text", []string{"Register", "Inspect"}, "", false},
		{"month names", []string{"02 Dec 2026 08:15", "15 Jan 2025 17:01:02"}, "D MMM YYYY[ h:mm[:ss[.f]]]", false},
		{"german month names", []string{"2. Dez. 2026 08:15", "3. März 2025"}, "D. MMM YYYY[ h:mm[:ss[.f]]]", false},
		{"oracle", []string{"02-DEC-26", "15-JAN-25"}, "D-MMM-YY[ h:mm[:ss[.f]]]", false},
		{"written english", []string{"Dec 2, 2026 8:15 AM", "Jan 15, 2025 11:59 PM"}, "MMM D, YYYY h:mm[:ss] AP", false},
		{"rfc 5322", []string{"Fri, 21 Nov 1997 09:55:06 -0600", "Tue, 1 Jul 2003 10:52:37 GMT"}, "WWW, D MMM YYYY hh:mm[:ss] Z", false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			inf := Infer(tc.sample)
			if tc.want == "" {
				assert.Nil(t, inf.Format)
				return
			}
			require.NotNil(t, inf.Format)
			assert.Equal(t, tc.want, inf.Format.String())
			assert.Equal(t, tc.ambiguous, inf.Ambiguous)
		})
	}
}

func repeat(s string, n int) []string {
	out := make([]string, n)
	for i := range out {
		out[i] = s
	}
	return out
}

// TestDaysFromCivil compares the calendar arithmetic with the standard library on every day of
// 1600-2400 (time.Date as the reference).
func TestDaysFromCivil(t *testing.T) {
	for d := time.Date(1600, 1, 1, 0, 0, 0, 0, time.UTC); d.Year() < 2400; d = d.AddDate(0, 0, 1) {
		got := daysFromCivil(int64(d.Year()), int64(d.Month()), int64(d.Day()))
		if got*86400 != d.Unix() {
			t.Fatalf("%v: got %d days", d, got)
		}
	}
}

func FuzzParse(f *testing.F) {
	f.Add("YYYY-MM-DDThh:mm[:ss[.f]][Z]", "2024-03-05T07:08:09.123+01:00")
	f.Add("M/D/YYYY h:mm[:ss] AP", "3/5/2024 7:08 PM")
	f.Add("epoch-ms", "1709622489250")
	f.Add("WWW, D MMM YYYY hh:mm[:ss] Z", "Fri, 21 Nov 1997 09:55:06 GMT")
	f.Add("D. MMM YY", "2. févr. 26")
	f.Fuzz(func(t *testing.T, layout, value string) {
		fm, err := ParseFormat(layout)
		if err != nil {
			return
		}
		fm.ParseString(value) // must not panic
	})
}

func BenchmarkParseISO(b *testing.B) {
	f, _ := ParseFormat("YYYY-MM-DDThh:mm[:ss[.f]][Z]")
	in := []byte("2024-03-05T07:08:09.123+01:00")
	b.SetBytes(int64(len(in)))
	b.ReportAllocs()
	for b.Loop() {
		f.Parse(in)
	}
}

// BenchmarkTimeParse is the standard library reading the same text, side by side with ParseISO.
func BenchmarkTimeParse(b *testing.B) {
	in := "2024-03-05T07:08:09.123+01:00"
	b.SetBytes(int64(len(in)))
	b.ReportAllocs()
	for b.Loop() {
		_, _ = time.Parse(time.RFC3339Nano, in)
	}
}

// TestISOFastPathAgrees checks the fixed-offset reader against the general matcher on many
// values, valid and not, and against the standard library's time.Date on every 13th day and
// every day around a year's turn, from the year 0 to 9999.
func TestISOFastPathAgrees(t *testing.T) {
	f, _ := ParseFormat("YYYY-MM-DD hh:mm[:ss[.f]][Z]")
	slow := &Format{layout: f.layout, items: f.items}
	for _, s := range []string{"2024-02-29 23:59:59", "2023-02-29 10:00:00", "2024-12-31 24:00:00", "2024-01-01 10:61:00",
		"1970-01-01 00:00:00", "2024-1x-01 10:00:00", "2024-01-01T10:00:00", "0001-01-01 00:00:00", "2024-06-30 12:34:60"} {
		a, okA := f.ParseString(s)
		b, okB := slow.ParseString(s)
		assert.Equal(t, okB, okA, s)
		assert.Equal(t, b, a, s)
	}
	end := time.Date(10000, 1, 1, 0, 0, 0, 0, time.UTC)
	for d := time.Date(0, 1, 1, 23, 59, 58, 0, time.UTC); d.Before(end); d = d.AddDate(0, 0, 13) {
		for _, day := range []time.Time{d, time.Date(d.Year(), 12, 31, 12, 0, 1, 0, time.UTC), time.Date(d.Year(), 1, 1, 0, 0, 0, 0, time.UTC), time.Date(d.Year(), 3, 1, 7, 8, 9, 0, time.UTC)} {
			s := day.Format("2006-01-02 15:04:05")
			got, ok := parseISOSeconds([]byte(s), ' ')
			if !ok || got != day.UnixMicro() {
				t.Fatalf("%s: %d %v, want %d", s, got, ok, day.UnixMicro())
			}
		}
	}
}
