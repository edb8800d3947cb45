package sqlstore

import (
	"bytes"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestStoredBody checks the stored form of plan bodies: a plan answer is stored
// as bodyTag and an S2 block several times smaller, a short body as it is, a
// body that itself begins with bodyTag compressed, and every one reads back byte
// for byte; a body stored before compression (plain JSON) reads back as it is.
func TestStoredBody(t *testing.T) {
	t.Parallel()
	answer, err := os.ReadFile("../../catalogtest/testdata/plan-answer.json")
	require.NoError(t, err)
	magicFirst := append(append([]byte{}, bodyTag...), []byte("not a block")...)
	for _, tc := range []struct {
		name       string
		body       []byte
		compressed bool
	}{
		{"plan answer", answer, true},
		{"short", []byte(`{"id":"p1"}`), false},
		{"empty", []byte{}, false},
		{"begins with the tag", magicFirst, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			stored := storedBody(nil, tc.body)
			require.NotNil(t, stored, "a NOT NULL column")
			assert.Equal(t, tc.compressed, bytes.HasPrefix(stored, bodyTag))
			if !tc.compressed {
				assert.Equal(t, tc.body, stored)
			}
			got, err := readBody(stored)
			require.NoError(t, err)
			assert.True(t, bytes.Equal(tc.body, got), "read back byte for byte")
		})
	}
	stored := storedBody(nil, answer)
	assert.Less(t, 3*len(stored), len(answer), "a plan answer (%d bytes) stored in %d bytes: want at least threefold smaller", len(answer), len(stored))

	legacy, err := readBody(answer)
	require.NoError(t, err)
	assert.True(t, bytes.Equal(answer, legacy), "a row stored before compression reads as it is")

	_, err = readBody(append(append([]byte{}, bodyTag...), 0xff, 0xff, 0xff))
	assert.ErrorContains(t, err, "decompressing the stored plan body", "a corrupt block is an error, not a body")
}

// BenchmarkStoredBody is the compression of a plan answer on the way into the
// store and its decompression on the way out.
func BenchmarkStoredBody(b *testing.B) {
	answer, err := os.ReadFile("../../catalogtest/testdata/plan-answer.json")
	require.NoError(b, err)
	stored := storedBody(nil, answer)
	b.Run("store", func(b *testing.B) {
		b.SetBytes(int64(len(answer)))
		var dst []byte
		for b.Loop() {
			dst = storedBody(dst, answer)
		}
	})
	b.Run("read", func(b *testing.B) {
		b.SetBytes(int64(len(answer)))
		for b.Loop() {
			if _, err := readBody(stored); err != nil {
				b.Fatal(err)
			}
		}
	})
}
