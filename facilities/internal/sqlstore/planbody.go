package sqlstore

import (
	"bytes"
	"errors"
	"fmt"
	"slices"

	"github.com/klauspost/compress/s2"
)

// Stored plan bodies are compressed: a plan answer is tens of kB of JSON that
// S2 (github.com/klauspost/compress/s2, a faster extension of Snappy) shrinks
// almost fourfold, so a plan's row takes four pages of the database and its log
// instead of a dozen. Measured in one run on the 48 kB answer of
// catalogtest's benchmark: zstd at its fastest level 8.5 kB in 90 to 120 µs,
// S2 13.3 kB in 30 to 35 µs; in the distinct-plan path CPU is what runs out
// first, so S2 (docs/performance.md).

// The format tag is bodyTag: a stored body that begins with it is bodyTag and
// an S2 block holding the body; any other stored body is the body itself, as
// rows written before compression hold it (JSON never begins with a zero byte).
// A body that itself begins with bodyTag is always stored compressed, so every
// body reads back byte for byte; a short body, which compression would not
// shrink, is stored as it is.

// bodyTag begins every compressed stored body.
var bodyTag = []byte("\x00s2")

// minCompressed is the shortest body worth compressing, in bytes.
const minCompressed = 512

// maxBodyBytes bounds a decompressed body (16 MiB, four times the service's
// largest plan answer), so that a corrupt block cannot exhaust memory.
const maxBodyBytes = 16 << 20

// storedBody returns body as it is stored, in dst's memory when it has room.
func storedBody(dst, body []byte) []byte {
	return nonNil(appendStoredBody(dst[:0], body))
}

// appendStoredBody appends body as it is stored to dst.
func appendStoredBody(dst, body []byte) []byte {
	if len(body) < minCompressed && !bytes.HasPrefix(body, bodyTag) {
		return append(dst, body...)
	}
	start := len(dst)
	dst = slices.Grow(dst, len(bodyTag)+s2.MaxEncodedLen(len(body)))
	dst = append(dst, bodyTag...)
	block := s2.Encode(dst[len(dst):cap(dst)], body)
	return dst[:start+len(bodyTag)+len(block)]
}

// readBody returns the body that stored holds.
func readBody(stored []byte) ([]byte, error) {
	if !bytes.HasPrefix(stored, bodyTag) {
		return nonNil(stored), nil
	}
	block := stored[len(bodyTag):]
	n, err := s2.DecodedLen(block)
	if err == nil && n > maxBodyBytes {
		err = errors.New("longer than the largest body")
	}
	var b []byte
	if err == nil {
		b, err = s2.Decode(make([]byte, n), block)
	}
	if err != nil {
		return nil, fmt.Errorf("decompressing the stored plan body: %w", err)
	}
	return nonNil(b), nil
}
