package api_test

import (
	"bytes"
	"context"
	"encoding/json"
	"encoding/xml"
	"image/png"
	"io"
	"net/http"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/internal/app"
)

// storedPlan plans the example request file in the catalog server ts and returns
// the plan's id.
func storedPlan(t *testing.T, url, file string) string {
	t.Helper()
	body, err := os.ReadFile(file)
	require.NoError(t, err)
	resp, err := http.Post(url+"/v1/plans", "application/json", bytes.NewReader(body))
	require.NoError(t, err)
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	require.Equal(t, http.StatusOK, resp.StatusCode, "%s", b)
	var plan struct {
		ID string `json:"id"`
	}
	require.NoError(t, json.Unmarshal(b, &plan))
	return plan.ID
}

func TestPlanCharts(t *testing.T) {
	ts, _ := catalogServer(t, nil)
	id := storedPlan(t, ts.URL, "../examples/orrin-j16-tsw-1.json")
	water := storedPlan(t, ts.URL, "../examples/quill-u5-wtn-04.json")
	cases := []struct {
		name, path, accept string
		status             int
		ctype              string
		// problem is a substring of a problem's detail.
		problem string
	}{
		{"envelope svg", "/v1/plans/" + id + "/charts/envelope.svg", "", 200, "image/svg+xml", ""},
		{"loads png", "/v1/plans/" + id + "/charts/loads.png", "", 200, "image/png", ""},
		{"trade pdf", "/v1/plans/" + id + "/charts/reynolds-trade.pdf", "", 200, "application/pdf", ""},
		{"water envelope png", "/v1/plans/" + water + "/charts/envelope.png", "", 200, "image/png", ""},
		{"water trade svg", "/v1/plans/" + water + "/charts/reynolds-trade.svg", "", 200, "image/svg+xml", ""},
		{"accept png", "/v1/plans/" + id + "/charts/loads", "image/png", 200, "image/png", ""},
		{"accept weighted", "/v1/plans/" + id + "/charts/loads", "image/png;q=0.5, application/pdf", 200, "application/pdf", ""},
		{"accept any", "/v1/plans/" + id + "/charts/envelope", "*/*", 200, "image/svg+xml", ""},
		{"no accept", "/v1/plans/" + id + "/charts/envelope", "", 200, "image/svg+xml", ""},
		{"accept html", "/v1/plans/" + id + "/charts/envelope", "text/html", 406, "application/problem+json", `Accept "text/html"`},
		{"unknown chart", "/v1/plans/" + id + "/charts/pressure.svg", "", 404, "application/problem+json", `no chart "pressure"`},
		{"unknown format", "/v1/plans/" + id + "/charts/envelope.gif", "", 404, "application/problem+json", `no chart format "gif"`},
		{"unknown plan", "/v1/plans/0000000000/charts/envelope.svg", "", 404, "application/problem+json", ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			req, err := http.NewRequest(http.MethodGet, ts.URL+tc.path, nil)
			require.NoError(t, err)
			if tc.accept != "" {
				req.Header.Set("Accept", tc.accept)
			}
			resp, err := http.DefaultClient.Do(req)
			require.NoError(t, err)
			defer resp.Body.Close()
			b, err := io.ReadAll(resp.Body)
			require.NoError(t, err)
			require.Equal(t, tc.status, resp.StatusCode, "%s", b)
			assert.Equal(t, tc.ctype, resp.Header.Get("Content-Type"))
			if tc.problem != "" {
				var p struct {
					Status int    `json:"status"`
					Detail string `json:"detail"`
				}
				require.NoError(t, json.Unmarshal(b, &p))
				assert.Equal(t, tc.status, p.Status)
				assert.Contains(t, p.Detail, tc.problem)
			}
			if tc.status == http.StatusOK {
				assert.Contains(t, resp.Header.Get(api.HeaderCaution), "approved limits, procedures and licensed engineering judgement govern")
			}
			switch tc.ctype {
			case "image/png":
				img, err := png.Decode(bytes.NewReader(b))
				require.NoError(t, err)
				assert.Equal(t, 768, img.Bounds().Dx())
				assert.Equal(t, 528, img.Bounds().Dy())
			case "image/svg+xml":
				var svg struct {
					XMLName xml.Name
					Width   string `xml:"width,attr"`
					Height  string `xml:"height,attr"`
				}
				require.NoError(t, xml.Unmarshal(b, &svg))
				assert.Equal(t, "svg", svg.XMLName.Local)
				assert.Equal(t, "576pt", svg.Width)
				assert.Equal(t, "396pt", svg.Height)
			case "application/pdf":
				assert.True(t, bytes.HasPrefix(b, []byte("%PDF-")), "starts %q", b[:min(8, len(b))])
			}
		})
	}
}

// TestEnvelopeEdgeLimits checks the limits named on the envelope's edges: in a
// gas the lower edge is the lowest stagnation pressure; in water, where the
// Reynolds number hardly depends on the pressure, the coldest water: the
// viscosity of water falls as it warms (the IAPWS 2008 correlation the facilities
// package uses), so the lowest temperature gives the lowest Reynolds number.
func TestEnvelopeEdgeLimits(t *testing.T) {
	cases := []struct {
		id       string
		lowLimit string
	}{
		{"tsw-1", facilities.ConstraintPressureMin},
		{"wtn-04", facilities.ConstraintTempMin},
	}
	for _, tc := range cases {
		t.Run(tc.id, func(t *testing.T) {
			f, err := facilities.DemoCatalog{}.Facility(context.Background(), tc.id)
			require.NoError(t, err)
			e, err := app.EnvelopeOf(&f, 0.1)
			require.NoError(t, err)
			require.Len(t, e.X, len(e.LowLimit))
			reached := 0
			for i := range e.X {
				if e.Low[i] > 0 {
					reached++
					assert.Equal(t, tc.lowLimit, e.LowLimit[i], "x %g", e.X[i])
					assert.LessOrEqual(t, e.Low[i], e.High[i]*(1+1e-9), "x %g", e.X[i])
					assert.NotEmpty(t, e.HighLimit[i], "x %g", e.X[i])
				}
			}
			assert.Greater(t, reached, len(e.X)/2, "most columns are reachable")
		})
	}
}
