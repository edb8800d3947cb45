package pages_test

import (
	"io"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/testfixture/testsite"
)

func TestPages(t *testing.T) {
	s := testsite.Start(t)
	base, id := s.URL, s.PlanID
	article := url.Values{
		"article.reference_length": {"2.6 m"}, "article.reference_area": {"50"}, "article.span": {"19"},
		"article.frontal_area": {"5.5"}, "article.wetted_area": {"290"},
		"article.aero.lift_slope": {"5"}, "article.aero.zero_lift_alpha": {"-1.5"}, "article.aero.cl_max": {"1.3"},
		"article.aero.cd_min": {"0.021"}, "article.aero.cl_at_cd_min": {"0.15"}, "article.aero.induced_drag_factor": {"0.055"},
		"article.aero.cm_zero": {"0.02"}, "article.aero.cm_slope": {"-1.1"},
	}
	with := func(extra url.Values) url.Values {
		v := url.Values{}
		for k, x := range article {
			v[k] = x
		}
		for k, x := range extra {
			v[k] = x
		}
		return v
	}
	cases := []struct {
		name   string
		method string
		path   string
		form   url.Values
		status int
		want   []string
	}{
		{"index", "GET", "/", nil, 200, []string{"tsw-1", `href="/facilities/wtn-04"`}},
		{"facility", "GET", "/facilities/tsw-1", nil, 200, []string{"Version history", "/v1/facilities/tsw-1/envelope.svg?reference_length=0.1"}},
		{"facility bad length", "GET", "/facilities/tsw-1?reference_length=-3", nil, 400, []string{"reference_length: "}},
		{"unknown facility", "GET", "/facilities/nope", nil, 404, []string{"nope"}},
		{"plan", "GET", "/plans/" + id, nil, 200, []string{"Cautions", "/v1/plans/" + id + "/charts/loads.svg", `href="/v1/plans/` + id + `"`}},
		{"unknown plan", "GET", "/plans/0000", nil, 404, []string{"Not Found"}},
		{"check form", "GET", "/check", nil, 200, []string{`name="test.stagnation_pressure"`, `<option value="int-b1"`}},
		{"check", "POST", "/check", with(url.Values{"facility_id": {"tsw-1"}, "installation.balance_id": {"int-b1"},
			"model.scale": {"1:30"}, "test.mach": {"0.8"}, "test.stagnation_pressure": {"1.5 bar"},
			"test.stagnation_temperature": {"310"}, "alpha.from": {"-4"}, "alpha.to": {"16"}, "alpha.step": {"2"}}),
			200, []string{`id="verdict-fits"`, "data:image/svg&#43;xml;base64,", "Balance int-b1"}},
		{"check every balance", "POST", "/check", with(url.Values{"facility_id": {"tsw-1"},
			"model.scale": {"1:30"}, "test.mach": {"0.8"}, "test.stagnation_pressure": {"1.5 bar"},
			"test.stagnation_temperature": {"310"}, "alpha.from": {"-4"}, "alpha.to": {"16"}, "alpha.step": {"2"}}),
			200, []string{"Balance int-b1", "Balance int-b2"}},
		{"check from plan", "POST", "/check", url.Values{"plan_id": {id}}, 200, []string{"From plan", `id="verdict-loads"`}},
		{"check from plan, new pressure", "POST", "/check", with(url.Values{"plan_id": {id}, "test.stagnation_pressure": {"1 bar"}}),
			200, []string{`id="verdict-fits"`, "Balance int-b1"}},
		{"check unknown plan", "POST", "/check", url.Values{"plan_id": {"0000"}}, 400, []string{`id="f-plan-id-error"`, `no plan &#34;0000&#34; is stored`}},
		{"check bad unit", "POST", "/check", with(url.Values{"facility_id": {"tsw-1"}, "model.scale": {"1:30"},
			"test.stagnation_pressure": {"2 furlongs"}}), 400, []string{`id="f-test-stagnation-pressure-error"`, "furlongs"}},
		{"check empty", "POST", "/check", url.Values{}, 400, []string{`id="form-errors"`, "facility_id"}},
		{"check unknown facility", "POST", "/check", with(url.Values{"facility_id": {"nope"}, "model.scale": {"0.05"},
			"test.mach": {"0.5"}, "alpha.from": {"0"}, "alpha.to": {"2"}, "alpha.step": {"1"}}), 404, []string{"nope"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var resp *http.Response
			var err error
			if tc.method == "POST" {
				resp, err = http.PostForm(base+tc.path, tc.form)
			} else {
				resp, err = http.Get(base + tc.path)
			}
			require.NoError(t, err)
			defer resp.Body.Close()
			b, err := io.ReadAll(resp.Body)
			require.NoError(t, err)
			require.Equal(t, tc.status, resp.StatusCode, "%.2000s", b)
			assert.Equal(t, "text/html; charset=utf-8", resp.Header.Get("Content-Type"))
			for _, s := range tc.want {
				assert.True(t, strings.Contains(string(b), s), "the page has %q", s)
			}
			assert.True(t, strings.HasPrefix(string(b), "<!DOCTYPE html>"))
		})
	}
}

func TestStylesheet(t *testing.T) {
	base := testsite.Start(t).URL
	resp, err := http.Get(base + "/static/pages.css")
	require.NoError(t, err)
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	require.Equal(t, http.StatusOK, resp.StatusCode)
	assert.Equal(t, "text/css; charset=utf-8", resp.Header.Get("Content-Type"))
	assert.Contains(t, string(b), "@media print")
}
