package intake

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"context"
	"fmt"
	"io"

	"tracewright/core/eventlog"
)

// Options steer Read for either format.
type Options struct {
	CSV CSVOptions
	XES XESOptions
	// Policy, MaxReported, Size and Progress apply to both formats.
	OnError     Policy
	MaxReported int
	Size        int64
	Progress    func(Progress)
}

// Format names a file format.
type Format string

// The formats Read knows.
const (
	FormatCSV Format = "csv"
	FormatXES Format = "xes"
)

// Detect looks at the first bytes of a file (after decompression) and says whether it is XES or
// CSV: XML starts, after an optional byte-order mark and white space, with '<'.
func Detect(head []byte) Format {
	head = bytes.TrimPrefix(head, []byte("\xef\xbb\xbf"))
	head = bytes.TrimLeft(head, " \t\r\n")
	if len(head) > 0 && head[0] == '<' {
		return FormatXES
	}
	return FormatCSV
}

// Open wraps r so that it yields the file's text: gzip is undone (detected by its magic bytes,
// RFC 1952 section 2.3.1), UTF-16 with a byte-order mark and text that is not UTF-8 become UTF-8.
// It returns the format of the text and any warning for the user.
func Open(r io.Reader) (io.Reader, Format, []string, error) {
	br := bufio.NewReaderSize(r, 64<<10)
	magic, _ := br.Peek(2)
	var text io.Reader = br
	if len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, "", nil, fmt.Errorf("%w: gzip header: %w", ErrUnsupported, err)
		}
		zr.Multistream(true)
		text = zr
	}
	tr := bufio.NewReaderSize(text, 64<<10)
	head, err := tr.Peek(4096)
	if err != nil && err != io.EOF && err != bufio.ErrBufferFull {
		return nil, "", nil, err
	}
	if len(head) == 0 {
		return nil, "", nil, ErrEmpty
	}
	if at := binaryAt(head); at >= 0 {
		return nil, "", nil, fmt.Errorf("%w: this is not a text file (CSV or XES): byte %d is a control character; is it a spreadsheet or an archive?", ErrUnsupported, at+1)
	}
	var warnings []string
	var out io.Reader = tr
	enc := sniffEncoding(head)
	if enc == encCP1252 && Detect(head) == FormatXES {
		enc = encUTF8 // XML declares its encoding; the XES reader honours the declaration
	}
	switch enc {
	case encUTF16LE, encUTF16BE:
		out = newUTF16Reader(tr, enc == encUTF16BE)
		warnings = append(warnings, "the file is UTF-16 text; it was converted to UTF-8 while reading")
		head = nil
	case encCP1252:
		out = newCP1252Reader(tr)
		warnings = append(warnings, "the file is not UTF-8 text; it was read as Windows-1252 (Western European)")
	}
	if head == nil {
		br2 := bufio.NewReaderSize(out, 64<<10)
		head, _ = br2.Peek(4096)
		out = br2
	}
	return out, Detect(head), warnings, nil
}

// Read reads an event log of either format, detected from its content.
func Read(ctx context.Context, r io.Reader, opt Options) (*eventlog.Log, *Report, error) {
	cr := &countingReader{r: r}
	text, format, warnings, err := Open(cr)
	if err != nil {
		return nil, nil, err
	}
	// Progress is reported over the bytes of the file as stored, compressed or not.
	progress := opt.Progress
	if progress != nil {
		progress = func(p Progress) {
			p.Bytes = cr.n
			opt.Progress(p)
		}
	}
	var l *eventlog.Log
	var rep *Report
	switch format {
	case FormatXES:
		xo := opt.XES
		xo.OnError, xo.MaxReported, xo.Size, xo.Progress = opt.OnError, opt.MaxReported, opt.Size, progress
		l, rep, err = ReadXES(ctx, text, xo)
	default:
		co := opt.CSV
		co.OnError, co.MaxReported, co.Size, co.Progress = opt.OnError, opt.MaxReported, opt.Size, progress
		l, rep, err = ReadCSV(ctx, text, co)
	}
	if rep != nil {
		rep.Warnings = append(warnings, rep.Warnings...)
		rep.Bytes = cr.n
	}
	return l, rep, err
}

// binaryAt returns the offset of the first byte that shows head is not text: a NUL, or any
// control character other than tab, CR, LF and form feed once they make up more than 1% of the
// head. It returns -1 for text. UTF-16 (NUL-rich) is recognised by its byte-order mark first.
func binaryAt(head []byte) int {
	if sniffEncoding(head) == encUTF16LE || sniffEncoding(head) == encUTF16BE {
		return -1
	}
	first, n := -1, 0
	for i, c := range head {
		if c == 0 {
			return i
		}
		if c < 0x20 && c != '\t' && c != '\r' && c != '\n' && c != '\f' {
			if first < 0 {
				first = i
			}
			n++
		}
	}
	if n*100 > len(head) {
		return first
	}
	return -1
}
