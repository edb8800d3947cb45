package unitjson

import (
	"bytes"
	"encoding/json"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// stdTree decodes body as Decode did before parseTree: encoding/json with
// UseNumber, one value and nothing after it.
func stdTree(body []byte) (any, bool) {
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.UseNumber()
	var tree any
	if err := dec.Decode(&tree); err != nil {
		return nil, false
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, false
	}
	return tree, true
}

// checkTree fails when parseTree accepts body but makes a different tree from
// encoding/json's, or accepts what encoding/json refuses.
func checkTree(t *testing.T, body []byte) {
	t.Helper()
	got, ok := parseTree(body)
	if !ok {
		return // encoding/json decides
	}
	want, wantOK := stdTree(body)
	require.True(t, wantOK, "parseTree accepts %q, which encoding/json refuses", body)
	require.Equal(t, want, got, "parseTree(%q) against encoding/json", body)
}

// TestParseTree compares parseTree with encoding/json on edge cases, on the
// example requests, and on seeded random documents and their mutations.
func TestParseTree(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		body   string
		wantOK bool // parseTree takes it itself
	}{
		{"object", `{"a": 1, "b": [true, false, null], "c": {"d": "e"}}`, true},
		{"empty containers", ` { "a" : [ ] , "b" : { } } `, true},
		{"repeated key keeps the last", `{"a":1,"a":"two"}`, true},
		{"numbers", `[0, -0, 1.5e3, -2E-7, 10, 0.001e+2]`, true},
		{"simple escapes", `["a\"b\\c\/d\n\t\r\b\f"]`, true},
		{"utf-8", `{"ß":"35 000 ft · 1∶16"}`, true},
		{"u escape", `["\u00df"]`, false},
		{"invalid escape", `["\x"]`, false},
		{"invalid utf-8", "[\"\xff\"]", false},
		{"control character", "[\"a\x01\"]", false},
		{"leading zero", `[01]`, false},
		{"bare minus", `[-]`, false},
		{"no fraction digits", `[1.]`, false},
		{"no exponent digits", `[1e+]`, false},
		{"trailing comma", `[1,]`, false},
		{"trailing data", `{} {}`, false},
		{"unquoted key", `{a:1}`, false},
		{"truncated", `{"a":`, false},
		{"bad literal", `[tru]`, false},
		{"literal run-on", `truex`, false},
		{"too deep", strings.Repeat("[", maxTreeDepth+1) + strings.Repeat("]", maxTreeDepth+1), false},
		{"deepest taken", strings.Repeat("[", maxTreeDepth) + strings.Repeat("]", maxTreeDepth), true},
		{"non-JSON space", "\v{}", false},
		{"empty", ``, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			_, ok := parseTree([]byte(tt.body))
			assert.Equal(t, tt.wantOK, ok, "parseTree(%q) takes it itself", tt.body)
			checkTree(t, []byte(tt.body))
		})
	}
	files, _ := filepath.Glob("../../examples/*.json")
	files = append(files, "../../api/testdata/load/plan-orrin-j16-tsw-1.json")
	for _, name := range files {
		b, err := os.ReadFile(name)
		require.NoError(t, err)
		_, ok := parseTree(b)
		assert.True(t, ok, "%s: parseTree leaves an example request to encoding/json", name)
		checkTree(t, b)
	}
	rng := rand.New(rand.NewPCG(5, 17))
	alphabet := []byte(`{}[]":,-.eE+0123456789 truefalsn\/ab` + "\t\n\xc3\x9f\xff")
	for range 3000 {
		var sb strings.Builder
		randomJSON(rng, &sb, 0)
		b := []byte(sb.String())
		checkTree(t, b)
		// The same with a few bytes changed, inserted or removed.
		for range 3 {
			m := bytes.Clone(b)
			for range 1 + rng.IntN(3) {
				i := rng.IntN(len(m) + 1)
				c := alphabet[rng.IntN(len(alphabet))]
				switch rng.IntN(3) {
				case 0:
					if i < len(m) {
						m[i] = c
					}
				case 1:
					m = append(m[:i], append([]byte{c}, m[i:]...)...)
				default:
					if i < len(m) {
						m = append(m[:i], m[i+1:]...)
					}
				}
			}
			checkTree(t, m)
		}
	}
}

// randomJSON writes a random JSON value.
func randomJSON(rng *rand.Rand, sb *strings.Builder, depth int) {
	k := rng.IntN(8)
	if depth > 4 {
		k = 2 + rng.IntN(6)
	}
	switch k {
	case 0:
		sb.WriteByte('{')
		for i := range rng.IntN(4) {
			if i > 0 {
				sb.WriteByte(',')
			}
			sb.WriteString(strconv.Quote(randomWord(rng)))
			sb.WriteString(": ")
			randomJSON(rng, sb, depth+1)
		}
		sb.WriteByte('}')
	case 1:
		sb.WriteString("[ ")
		for i := range rng.IntN(4) {
			if i > 0 {
				sb.WriteString(", ")
			}
			randomJSON(rng, sb, depth+1)
		}
		sb.WriteByte(']')
	case 2, 3:
		sb.WriteString(strconv.Quote(randomWord(rng)))
	case 4:
		sb.WriteString(strconv.FormatFloat(rng.NormFloat64()*1e3, 'g', -1, 64))
	case 5:
		sb.WriteString(strconv.FormatFloat(rng.ExpFloat64()*1e-20, 'e', rng.IntN(6), 64))
	case 6:
		sb.WriteString([]string{"true", "false", "null"}[rng.IntN(3)])
	default:
		sb.WriteString(strconv.Itoa(rng.IntN(2000) - 1000))
	}
}

// randomWord returns a short string, sometimes with escapes or non-ASCII text.
func randomWord(rng *rand.Rand) string {
	words := []string{"mach", "altitude", "35000 ft", "1:16", "a\"b", "tab\there", "ß", "Δp", "back\\slash", ""}
	return words[rng.IntN(len(words))]
}

// FuzzParseTree checks parseTree against encoding/json on any input.
func FuzzParseTree(f *testing.F) {
	if b, err := os.ReadFile("../../api/testdata/load/plan-orrin-j16-tsw-1.json"); err == nil {
		f.Add(b)
	}
	for _, s := range []string{`{"a":[1,-2.5e3,"x\n",true,null]}`, `["\u00df"]`, `{} {}`, `[01]`, "[\"\xff\"]"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, body []byte) { checkTree(t, body) })
}
