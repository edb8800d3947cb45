package main

import (
	"bytes"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/testfixture"
)

func TestPlanCommandCharts(t *testing.T) {
	cases := []struct {
		name string
		args []string
	}{
		{"table", nil},
		{"json", []string{"--json"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), "charts")
			var out, errOut bytes.Buffer
			args := append([]string{"plan", "--data", "", "--chart", dir}, tc.args...)
			args = append(args, "-")
			require.NoError(t, run(args, strings.NewReader(testfixture.J16Plan), &out, &errOut))
			for _, name := range []string{"envelope", "loads", "reynolds-trade"} {
				for _, ext := range []string{"svg", "png", "pdf"} {
					path := filepath.Join(dir, name+"."+ext)
					b, err := os.ReadFile(path)
					require.NoError(t, err)
					assert.Contains(t, errOut.String(), "wrote "+path)
					if ext == "png" {
						img, err := png.Decode(bytes.NewReader(b))
						require.NoError(t, err)
						assert.Equal(t, 768, img.Bounds().Dx())
					}
				}
			}
			if tc.name == "json" {
				assert.True(t, strings.HasPrefix(out.String(), "{"), "stdout stays the JSON body alone")
			}
		})
	}
}
