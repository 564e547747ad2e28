package timestamp

import "time"

// rfc3339Micro keeps up to six fraction digits and drops trailing zeros, so a time read from
// "2024-03-01T08:00:00.250Z" is written back as it came.
const rfc3339Micro = "2006-01-02T15:04:05.999999Z07:00"

// AppendRFC3339 appends t (Unix microseconds) as an RFC 3339 / xs:dateTime text in UTC.
func AppendRFC3339(dst []byte, t int64) []byte {
	return time.UnixMicro(t).UTC().AppendFormat(dst, rfc3339Micro)
}

// FormatRFC3339 is AppendRFC3339 into a new string.
func FormatRFC3339(t int64) string {
	return string(AppendRFC3339(nil, t))
}
