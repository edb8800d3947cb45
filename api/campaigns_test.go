package api_test

import (
	"encoding/csv"
	"encoding/json"
	"net/http"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/campaign"
	"scalematch/internal/testfixture"
)

// postAccept posts body to path with an Accept header and returns the status,
// content type and body.
func postAccept(t *testing.T, url, accept, body string) (int, string, []byte) {
	t.Helper()
	var header map[string]string
	if accept != "" {
		header = map[string]string{"Accept": accept}
	}
	r := testfixture.Do(t, nil, http.MethodPost, url, header, []byte(body))
	return r.Status, r.Header.Get("Content-Type"), r.Body
}

func TestPostCampaign(t *testing.T) {
	ts := newServer(t)
	body, err := os.ReadFile("../examples/campaign-j16.json")
	require.NoError(t, err)

	code, ct, b := postAccept(t, ts.URL+"/v1/campaigns", "", string(body))
	require.Equal(t, http.StatusCreated, code, string(b))
	assert.Equal(t, "application/json; charset=utf-8", ct)
	var res campaign.Result
	require.NoError(t, json.Unmarshal(b, &res))
	assert.Equal(t, res.Summary.Conditions, res.Summary.ConditionsServed)
	assert.Len(t, res.Summary.ModelScales, 1)
	assert.NotEmpty(t, res.Cautions)

	code, ct, b = postAccept(t, ts.URL+"/v1/campaigns", "text/csv", string(body))
	require.Equal(t, http.StatusCreated, code, string(b))
	assert.Equal(t, "text/csv; charset=utf-8; header=present", ct)
	rows, err := csv.NewReader(strings.NewReader(string(b))).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, campaign.CSVHeader, rows[0])
	assert.Greater(t, len(rows), res.Summary.Conditions)

	code, ct, b = postAccept(t, ts.URL+"/v1/campaigns", "application/x-ndjson", string(body))
	require.Equal(t, http.StatusCreated, code, string(b))
	assert.Equal(t, "application/x-ndjson", ct)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	assert.Len(t, lines, res.Summary.Conditions+1)
	assert.Contains(t, lines[len(lines)-1], `"summary"`)

	code, _, b = postAccept(t, ts.URL+"/v1/campaigns", "image/png", string(body))
	assert.Equal(t, http.StatusNotAcceptable, code, string(b))
	assert.Contains(t, string(b), "text/csv")

	code, _, b = postAccept(t, ts.URL+"/v1/campaigns", "", strings.Replace(string(body), `"mach": 0.78`, `"mach": 7.8`, 1))
	assert.Equal(t, http.StatusBadRequest, code)
	assert.Contains(t, string(b), `"conditions[0].mach"`)

	// A facility id that names nothing is a bad item of the list, not a
	// missing resource.
	code, _, b = postAccept(t, ts.URL+"/v1/campaigns", "", strings.Replace(string(body), `"tsw-1"`, `"nowhere"`, 1))
	assert.Equal(t, http.StatusBadRequest, code, string(b))
	assert.Contains(t, string(b), `"facilities[0].facility_id"`)
}
