package timestamp

// Month and weekday names, for the layout tokens MMM and WWW.
//
// Exports write month names in the language of the system that made them, so MMM reads the full
// names and the usual abbreviations of English, German, French, Spanish, Italian, Dutch and
// Portuguese, in any case of their ASCII letters and with or without a closing period ("Dec",
// "dez.", "Dezember", "févr.", "mrt"). The names and abbreviations are those of the Unicode
// Common Locale Data Repository's Gregorian calendars for these languages, written from memory,
// plus the forms without accents that exports also write ("fevrier", "aout"). No name stands for
// two months in different languages (TestNamesAreUnambiguous). Weekday names are read in
// English only (RFC 5322 dates start with one) and not checked against the date.

// monthNameList gives, for each month, its names in the languages above.
var monthNameList = [12][]string{
	{"january", "jan", "januar", "jän", "janvier", "janv", "enero", "ene", "gennaio", "gen", "januari", "janeiro"},
	{"february", "feb", "febr", "februar", "février", "févr", "fév", "fevrier", "fevr", "fev", "febrero", "febbraio", "februari", "fevereiro"},
	{"march", "mar", "märz", "mär", "maerz", "mars", "marzo", "maart", "mrt", "março", "marco"},
	{"april", "apr", "avril", "avr", "abril", "abr", "aprile"},
	{"may", "mai", "mayo", "maggio", "mag", "mei", "maio"},
	{"june", "jun", "juni", "juin", "junio", "giugno", "giu", "junho"},
	{"july", "jul", "juli", "juillet", "juil", "julio", "luglio", "lug", "julho"},
	{"august", "aug", "août", "aout", "agosto", "ago", "augustus"},
	{"september", "sep", "sept", "septembre", "septiembre", "setiembre", "settembre", "set", "setembro"},
	{"october", "oct", "oktober", "okt", "octobre", "octubre", "ottobre", "ott", "outubro", "out"},
	{"november", "nov", "novembre", "noviembre", "novembro"},
	{"december", "dec", "dezember", "dez", "décembre", "déc", "decembre", "diciembre", "dic", "dicembre", "dezembro"},
}

var weekdayNameList = []string{
	"monday", "mon", "tuesday", "tue", "tues", "wednesday", "wed", "thursday", "thu", "thur", "thurs",
	"friday", "fri", "saturday", "sat", "sunday", "sun",
}

// monthNames and weekdayNames index the lists by name; they are built once and only read.
var monthNames, weekdayNames = func() (map[string]int64, map[string]bool) {
	m := map[string]int64{}
	for i, names := range monthNameList {
		for _, n := range names {
			m[n] = int64(i + 1)
		}
	}
	w := map[string]bool{}
	for _, n := range weekdayNameList {
		w[n] = true
	}
	return m, w
}()

// word reads the letters at b[i:] (ASCII letters and the bytes of non-ASCII UTF-8 letters) into
// buf, ASCII letters lowered, and skips one period after them. It returns the word and where
// reading stopped; a word longer than buf does not fit and is refused.
func word(b []byte, i int, buf *[16]byte) ([]byte, int, bool) {
	j := i
	for j < len(b) && (b[j]|0x20 >= 'a' && b[j]|0x20 <= 'z' || b[j] >= 0x80) {
		if j-i >= len(buf) {
			return nil, i, false
		}
		c := b[j]
		if c < 0x80 {
			c |= 0x20
		}
		buf[j-i] = c
		j++
	}
	if j == i {
		return nil, i, false
	}
	w := buf[:j-i]
	if j < len(b) && b[j] == '.' {
		j++
	}
	return w, j, true
}

func monthName(b []byte, i int) (int64, int, bool) {
	var buf [16]byte
	w, j, ok := word(b, i, &buf)
	if !ok {
		return 0, i, false
	}
	m, ok := monthNames[string(w)]
	return m, j, ok
}

func weekdayName(b []byte, i int) (int, bool) {
	var buf [16]byte
	w, j, ok := word(b, i, &buf)
	if !ok || !weekdayNames[string(w)] {
		return i, false
	}
	return j, true
}
