package intake

import (
	"bytes"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestPlainAgainstSWAR checks the hand-written wasm splitter against the portable one on random
// text of separators, quotes, CRs, line ends and letters, with and without more input to come,
// and with records of more fields than the splitter's table first holds.
func TestPlainAgainstSWAR(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	alphabet := []byte(",;\"\r\nabcdefgh")
	for i := 0; i < 50000; i++ {
		data := make([]byte, rng.IntN(200))
		quotes := i%4 == 0
		for j := range data {
			data[j] = alphabet[rng.IntN(len(alphabet))]
			if !quotes && data[j] == '"' {
				data[j] = 'q'
			}
		}
		for _, eof := range []bool{false, true} {
			a := &records{comma: ",;"[i%2], eof: eof}
			b := &records{comma: a.comma, eof: eof}
			n1, s1 := a.plain(data)
			n2, s2 := b.plainSWAR(data)
			if n1 != n2 || s1 != s2 || (s1 == complete && !slices.EqualFunc(a.fields, b.fields, bytes.Equal)) {
				t.Fatalf("%q eof=%v: %d %d %q, want %d %d %q", data, eof, n1, s1, a.fields, n2, s2, b.fields)
			}
		}
	}
}
