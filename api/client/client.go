// Package client is a small typed Go client of the scalematch HTTP API, version 1,
// for internal tools: planning, loads, conditions, atmosphere, groups and the
// facility catalog (read only).
package client

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"mime"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"scalematch/api/schema"
	"scalematch/atmosphere"
	"scalematch/facilities"
)

// Client calls one scalematch service. Build it with New; it is safe for concurrent
// use.
type Client struct {
	base *url.URL
	hc   *http.Client
	ua   string
}

// Option configures a Client.
type Option func(*Client)

// WithHTTPClient sets the HTTP client used for every call; nil keeps
// http.DefaultClient. Use it for timeouts, proxies and test servers.
func WithHTTPClient(hc *http.Client) Option {
	return func(c *Client) {
		if hc != nil {
			c.hc = hc
		}
	}
}

// WithUserAgent sets the User-Agent header sent with every call; "" keeps the
// default "scalematch-client/1".
func WithUserAgent(ua string) Option {
	return func(c *Client) {
		if ua != "" {
			c.ua = ua
		}
	}
}

// New returns a client of the service at baseURL ("http://127.0.0.1:8080"); it
// fails when baseURL is not an absolute http or https URL.
func New(baseURL string, opts ...Option) (*Client, error) {
	u, err := url.Parse(strings.TrimRight(baseURL, "/"))
	if err != nil {
		return nil, fmt.Errorf("client: base URL: %w", err)
	}
	if (u.Scheme != "http" && u.Scheme != "https") || u.Host == "" {
		return nil, fmt.Errorf("client: base URL %q is not an absolute http or https URL", baseURL)
	}
	c := &Client{base: u, hc: http.DefaultClient, ua: "scalematch-client/1"}
	for _, o := range opts {
		o(c)
	}
	return c, nil
}

// Problem is an error answer of the service (RFC 9457 problem details), returned as
// the error of every method when the service answers with one. Status is the HTTP
// status; Errors names the bad fields by JSON path; Limits the conflicting limits
// of an infeasible plan.
type Problem schema.Problem

// Error reports the status, title and detail, then every bad field.
func (p *Problem) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "scalematch: %d %s", p.Status, p.Title)
	if p.Detail != "" {
		b.WriteString(": ")
		b.WriteString(p.Detail)
	}
	for _, f := range p.Errors {
		name := f.Field
		if name == "" {
			name = "(body)"
		}
		fmt.Fprintf(&b, "; %s: %s", name, f.Message)
	}
	if len(p.Limits) > 0 {
		fmt.Fprintf(&b, " (limits: %s)", strings.Join(p.Limits, ", "))
	}
	return b.String()
}

// Plan plans one test (POST /v1/plans).
func (c *Client) Plan(ctx context.Context, req *schema.PlanRequest) (*schema.PlanResponse, error) {
	var out schema.PlanResponse
	if err := c.do(ctx, http.MethodPost, "/v1/plans", nil, req, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// PlanBatch plans many tests in one call (POST /v1/plans/batch); the results are
// in the order of reqs, each either a plan or a problem.
func (c *Client) PlanBatch(ctx context.Context, reqs []schema.PlanRequest) ([]schema.BatchResult, error) {
	var out schema.BatchResponse
	if err := c.do(ctx, http.MethodPost, "/v1/plans/batch", nil, schema.BatchRequest{Requests: reqs}, &out); err != nil {
		return nil, err
	}
	return out.Results, nil
}

// StoredPlan returns a stored plan (GET /v1/plans/{id}) exactly as first returned.
func (c *Client) StoredPlan(ctx context.Context, id string) (*schema.PlanResponse, error) {
	var out schema.PlanResponse
	if err := c.do(ctx, http.MethodGet, "/v1/plans/"+url.PathEscape(id), nil, nil, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// Loads computes the balance loads at given test settings (POST /v1/loads).
func (c *Client) Loads(ctx context.Context, req *schema.LoadsRequest) (*schema.LoadsResponse, error) {
	var out schema.LoadsResponse
	if err := c.do(ctx, http.MethodPost, "/v1/loads", nil, req, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// Conditions computes a facility's test-section state at given settings
// (POST /v1/conditions).
func (c *Client) Conditions(ctx context.Context, req *schema.ConditionsRequest) (*schema.ConditionsResponse, error) {
	var out schema.ConditionsResponse
	if err := c.do(ctx, http.MethodPost, "/v1/conditions", nil, req, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// AtmosphereQuery selects a point of the standard atmosphere: exactly one of
// Altitude (geometric, m) and PressureAltitude (m) set, and DeltaISA the temperature
// offset in K (zero: a standard day).
type AtmosphereQuery struct {
	Altitude         *float64
	PressureAltitude *float64
	DeltaISA         float64
}

// Atmosphere returns the standard atmosphere at a point (GET /v1/atmosphere).
func (c *Client) Atmosphere(ctx context.Context, q AtmosphereQuery) (*atmosphere.State, error) {
	v := url.Values{}
	if q.Altitude != nil {
		v.Set("altitude", strconv.FormatFloat(*q.Altitude, 'g', -1, 64))
	}
	if q.PressureAltitude != nil {
		v.Set("pressure_altitude", strconv.FormatFloat(*q.PressureAltitude, 'g', -1, 64))
	}
	if q.DeltaISA != 0 {
		v.Set("delta_isa", strconv.FormatFloat(q.DeltaISA, 'g', -1, 64))
	}
	var out atmosphere.State
	if err := c.do(ctx, http.MethodGet, "/v1/atmosphere", v, nil, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// Groups returns the dimensionless groups of a list of variables (POST /v1/groups).
func (c *Client) Groups(ctx context.Context, req *schema.GroupsRequest) (*schema.GroupsResponse, error) {
	var out schema.GroupsResponse
	if err := c.do(ctx, http.MethodPost, "/v1/groups", nil, req, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// Facilities lists the catalog's facilities (GET /v1/facilities).
func (c *Client) Facilities(ctx context.Context) ([]facilities.Facility, error) {
	var raw json.RawMessage
	if err := c.do(ctx, http.MethodGet, "/v1/facilities", nil, nil, &raw); err != nil {
		return nil, err
	}
	// The list is a bare array or an object {"facilities": [...]}; accept both.
	var list []facilities.Facility
	if err := json.Unmarshal(raw, &list); err == nil {
		return list, nil
	}
	var wrapped struct {
		Facilities []facilities.Facility `json:"facilities"`
	}
	if err := json.Unmarshal(raw, &wrapped); err != nil {
		return nil, fmt.Errorf("client: GET /v1/facilities: %w", err)
	}
	return wrapped.Facilities, nil
}

// Facility returns the current version of one facility (GET /v1/facilities/{id}).
func (c *Client) Facility(ctx context.Context, id string) (*facilities.Facility, error) {
	var out facilities.Facility
	if err := c.do(ctx, http.MethodGet, "/v1/facilities/"+url.PathEscape(id), nil, nil, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// Envelope returns the facility's envelope chart (GET /v1/facilities/{id}/envelope.svg
// or .png) for a model of reference length refLength m; format is "svg" or "png";
// a flight point is marked when flightMach and flightReynolds are both positive.
func (c *Client) Envelope(ctx context.Context, id, format string, refLength, flightMach, flightReynolds float64) ([]byte, error) {
	if format != "svg" && format != "png" {
		return nil, fmt.Errorf("client: envelope format %q: want svg or png", format)
	}
	v := url.Values{"reference_length": {strconv.FormatFloat(refLength, 'g', -1, 64)}}
	if flightMach > 0 && flightReynolds > 0 {
		v.Set("flight_mach", strconv.FormatFloat(flightMach, 'g', -1, 64))
		v.Set("flight_reynolds", strconv.FormatFloat(flightReynolds, 'g', -1, 64))
	}
	resp, err := c.send(ctx, http.MethodGet, "/v1/facilities/"+url.PathEscape(id)+"/envelope."+format, v, nil)
	if err != nil {
		return nil, err
	}
	defer resp.Body.Close()
	body, err := io.ReadAll(resp.Body)
	if err != nil {
		return nil, fmt.Errorf("client: reading the envelope: %w", err)
	}
	if resp.StatusCode >= 300 {
		return nil, problemOf(resp, body)
	}
	return body, nil
}

// do sends one JSON request and decodes a JSON answer into out, or returns the
// problem the service answered with.
func (c *Client) do(ctx context.Context, method, path string, q url.Values, in, out any) error {
	var body io.Reader
	if in != nil {
		b, err := json.Marshal(in)
		if err != nil {
			return fmt.Errorf("client: encoding the request: %w", err)
		}
		body = bytes.NewReader(b)
	}
	resp, err := c.send(ctx, method, path, q, body)
	if err != nil {
		return err
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		return fmt.Errorf("client: %s %s: reading the answer: %w", method, path, err)
	}
	if resp.StatusCode >= 300 {
		return problemOf(resp, b)
	}
	if err := json.Unmarshal(b, out); err != nil {
		return fmt.Errorf("client: %s %s: decoding the answer: %w", method, path, err)
	}
	return nil
}

func (c *Client) send(ctx context.Context, method, path string, q url.Values, body io.Reader) (*http.Response, error) {
	u := *c.base
	u.Path += path
	u.RawQuery = q.Encode()
	req, err := http.NewRequestWithContext(ctx, method, u.String(), body)
	if err != nil {
		return nil, fmt.Errorf("client: %w", err)
	}
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	req.Header.Set("Accept", "application/json, application/problem+json")
	req.Header.Set("User-Agent", c.ua)
	resp, err := c.hc.Do(req)
	if err != nil {
		return nil, fmt.Errorf("client: %s %s: %w", method, path, err)
	}
	return resp, nil
}

// problemOf turns an error answer into a *Problem; an answer that is not problem
// JSON becomes a Problem carrying the status and the body's first line.
func problemOf(resp *http.Response, body []byte) error {
	p := &Problem{Status: resp.StatusCode, Title: http.StatusText(resp.StatusCode)}
	mt, _, _ := mime.ParseMediaType(resp.Header.Get("Content-Type"))
	if mt == schema.ContentTypeProblem || mt == "application/json" {
		if err := json.Unmarshal(body, p); err == nil {
			if p.Status == 0 {
				p.Status = resp.StatusCode
			}
			return p
		}
	}
	line, _, _ := strings.Cut(strings.TrimSpace(string(body)), "\n")
	p.Detail = line
	return p
}
