package main

import (
	"encoding/json"
	"fmt"
	"net/http"
	"reflect"
	"slices"
	"strconv"
	"strings"

	"github.com/getkin/kin-openapi/openapi3"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/unitjson"
)

// generator completes a converted document.
type generator struct {
	doc *openapi3.T
	// types maps each component schema name to its Go struct type.
	types map[string]reflect.Type
	// inRequest and inResponse hold the schemas reachable from a request body
	// and from a response.
	inRequest, inResponse map[string]bool
	bounds                map[string]facilities.Bound
}

func newGenerator(doc *openapi3.T) (*generator, error) {
	g := &generator{doc: doc, types: map[string]reflect.Type{}, bounds: app.Bounds()}
	for name, v := range goTypes {
		t := reflect.TypeOf(v)
		g.types[name] = t
		for i := 0; i < t.NumField(); i++ {
			collect(g.types, t.Field(i).Type)
		}
	}
	// Whole schemas first (the unions); the schemas only they used go.
	for name, s := range schemaOverrides {
		if doc.Components.Schemas[name] == nil {
			return nil, fmt.Errorf("schemaOverrides names %s, which the document does not have", name)
		}
		doc.Components.Schemas[name] = s
	}
	var missing []string
	for name := range doc.Components.Schemas {
		if _, ok := g.types[name]; !ok {
			missing = append(missing, name)
		}
	}
	if len(missing) > 0 {
		slices.Sort(missing)
		return nil, fmt.Errorf("no Go type for the schemas %s: add their root to goTypes", strings.Join(missing, ", "))
	}
	g.inRequest, g.inResponse = map[string]bool{}, map[string]bool{}
	for _, item := range doc.Paths.Map() {
		for _, op := range item.Operations() {
			if op.RequestBody != nil && op.RequestBody.Value != nil {
				for _, mt := range op.RequestBody.Value.Content {
					g.reach(g.inRequest, mt.Schema)
				}
			}
			for _, r := range op.Responses.Map() {
				if r.Value != nil {
					for _, mt := range r.Value.Content {
						g.reach(g.inResponse, mt.Schema)
					}
				}
			}
		}
	}
	for name := range doc.Components.Schemas {
		if !g.inRequest[name] && !g.inResponse[name] {
			delete(doc.Components.Schemas, name)
		}
	}
	return g, nil
}

// reach marks every component schema s refers to, directly or through others.
func (g *generator) reach(seen map[string]bool, s *openapi3.SchemaRef) {
	if s == nil {
		return
	}
	if name, ok := strings.CutPrefix(s.Ref, "#/components/schemas/"); ok {
		if seen[name] {
			return
		}
		seen[name] = true
		s = g.doc.Components.Schemas[name]
		if s == nil {
			return
		}
	}
	v := s.Value
	if v == nil {
		return
	}
	for _, p := range v.Properties {
		g.reach(seen, p)
	}
	for _, list := range []openapi3.SchemaRefs{v.AllOf, v.OneOf, v.AnyOf} {
		for _, p := range list {
			g.reach(seen, p)
		}
	}
	g.reach(seen, v.Items)
	g.reach(seen, v.AdditionalProperties.Schema)
}

func (g *generator) run() error {
	g.security()
	// The description speaks of this document, not of the Swagger 2.0 one.
	before := g.doc.Info.Description
	g.doc.Info.Description = strings.Replace(before, swaggerNote, openAPI3Note, 1)
	if g.doc.Info.Description == before {
		return fmt.Errorf("the description lacks the note on the two documents: %q", swaggerNote)
	}
	names := make([]string, 0, len(g.doc.Components.Schemas))
	for name := range g.doc.Components.Schemas {
		names = append(names, name)
	}
	slices.Sort(names)
	// The shapes (required, nullable, list caps) of every schema, before a range
	// copies one (facilities.Range) into a property.
	for _, name := range names {
		if _, ok := schemaOverrides[name]; ok {
			continue
		}
		if err := g.shape(name); err != nil {
			return err
		}
	}
	used := map[string]bool{}
	for _, name := range names {
		if _, ok := schemaOverrides[name]; ok {
			continue
		}
		if err := g.numbers(name, used); err != nil {
			return err
		}
	}
	for key := range g.bounds {
		if !used[key] {
			return fmt.Errorf("the bound %s names no number of the document", key)
		}
	}
	for key := range propertyOverrides {
		if !used[key] {
			return fmt.Errorf("propertyOverrides names %s, which the document does not have", key)
		}
	}
	for key := range requestRequired {
		if g.doc.Components.Schemas[key] == nil {
			return fmt.Errorf("requestRequired names %s, which the document does not have", key)
		}
	}
	return g.problems()
}

// security describes the write token as what it is, an HTTP bearer token.
func (g *generator) security() {
	for name, s := range g.doc.Components.SecuritySchemes {
		if s.Value != nil && s.Value.Type == "apiKey" && s.Value.In == "header" && s.Value.Name == "Authorization" {
			g.doc.Components.SecuritySchemes[name] = &openapi3.SecuritySchemeRef{Value: &openapi3.SecurityScheme{
				Type:        "http",
				Scheme:      "bearer",
				Description: s.Value.Description,
			}}
		}
	}
}

// own returns a schema of p's that may be changed: a bare reference becomes
// allOf [reference], so that nullable or a description can stand beside it.
func own(p *openapi3.SchemaRef) *openapi3.SchemaRef {
	if p.Ref != "" {
		return &openapi3.SchemaRef{Value: &openapi3.Schema{AllOf: openapi3.SchemaRefs{{Ref: p.Ref}}}}
	}
	return p
}

// shape sets the required properties, the nullable ones and the caps on lists
// of schema name from its Go type.
func (g *generator) shape(name string) error {
	s := g.doc.Components.Schemas[name].Value
	t := g.types[name]
	if t.Kind() != reflect.Struct || s == nil {
		return nil
	}
	req, resp := g.inRequest[name], g.inResponse[name]
	wanted := requestRequired[name]
	for _, f := range fields(t) {
		p := s.Properties[f.name]
		if p == nil {
			return fmt.Errorf("%s.%s: the Go type has the field, swag's schema does not", name, f.name)
		}
		key := name + "." + f.name
		if o, ok := propertyOverrides[key]; ok {
			p = own(p)
			o.apply(p.Value)
			s.Properties[f.name] = p
		}
		always := !f.omitempty
		if b, ok := g.bounds[key]; ok && req && always && f.typ.Kind() == reflect.Float64 && !b.Contains(0) && zeroWhenAbsent[key] == "" && !requiredSometimes[name] {
			// A number the request must give: its zero value is out of its range.
			wanted = append(slices.Clip(wanted), f.name)
		}
		switch {
		case resp && always && (!req || slices.Contains(wanted, f.name)):
			s.Required = append(s.Required, f.name)
		case req && !resp && slices.Contains(wanted, f.name):
			s.Required = append(s.Required, f.name)
		}
		if resp && always && nilable(f.typ) {
			p = own(p)
			p.Value.Nullable = true
			s.Properties[f.name] = p
		}
		if req {
			if err := capList(p, f); err != nil {
				return fmt.Errorf("%s: %w", key, err)
			}
		}
	}
	for _, w := range wanted {
		if !slices.Contains(s.Required, w) {
			return fmt.Errorf("requestRequired: %s has no property %s that is always sent", name, w)
		}
	}
	slices.Sort(s.Required)
	return nil
}

// capList sets the largest number of items the decoder takes on a list or map
// field of a request (the maxItems tag, else unitjson.DefaultMaxItems).
func capList(p *openapi3.SchemaRef, f field) error {
	t := deref(f.typ)
	if t.Kind() != reflect.Slice && t.Kind() != reflect.Map || customJSON(t) {
		return nil
	}
	n := uint64(unitjson.DefaultMaxItems)
	if f.maxItems > 0 {
		n = uint64(f.maxItems)
	}
	v := p.Value
	if t.Kind() == reflect.Map {
		if v.AdditionalProperties.Schema == nil && v.Type.Is("object") {
			return fmt.Errorf("a map whose schema has no additionalProperties")
		}
		v.MaxProps = &n
		return nil
	}
	if !v.Type.Is("array") {
		return fmt.Errorf("a list whose schema is %v", v.Type)
	}
	v.MaxItems = &n
	return nil
}

// numbers writes the documented ranges and the unit strings of schema name's
// numbers, and records the bounds and overrides used.
func (g *generator) numbers(name string, used map[string]bool) error {
	s := g.doc.Components.Schemas[name].Value
	t := g.types[name]
	if t.Kind() != reflect.Struct || s == nil {
		return nil
	}
	for _, f := range fields(t) {
		key := name + "." + f.name
		if _, ok := propertyOverrides[key]; ok {
			used[key] = true
			continue
		}
		p := s.Properties[f.name]
		b, bounded := g.bounds[key]
		if bounded {
			used[key] = true
		}
		st := element(f.typ)
		switch {
		case st.Kind() == reflect.Struct && bounded:
			// The bound applies to the numbers inside (a Range's min and max):
			// the property gets its own copy of the struct's schema.
			inner, err := g.inline(schemaName(st), b, f.unit, zeroWhenAbsent[key])
			if err != nil {
				return fmt.Errorf("%s: %w", key, err)
			}
			inner.Description = p.Value.Description
			inner.Nullable = p.Value.Nullable
			s.Properties[f.name] = &openapi3.SchemaRef{Value: inner}
		case isFloat(f.typ):
			var bp *facilities.Bound
			if bounded {
				bp = &b
			}
			np, err := number(p, bp, f.unit, zeroWhenAbsent[key])
			if err != nil {
				return fmt.Errorf("%s: %w", key, err)
			}
			s.Properties[f.name] = np
		case bounded:
			return fmt.Errorf("%s has a bound but holds no number", key)
		}
	}
	return nil
}

// inline returns a copy of the struct schema name whose float properties all
// have the bound b (and 0, when zero says when) and, when they have no unit of
// their own, the unit.
func (g *generator) inline(name string, b facilities.Bound, unit, zero string) (*openapi3.Schema, error) {
	src := g.doc.Components.Schemas[name]
	if src == nil || src.Value == nil {
		return nil, fmt.Errorf("no schema %s", name)
	}
	raw, err := json.Marshal(src.Value)
	if err != nil {
		return nil, err
	}
	var c openapi3.Schema
	if err := json.Unmarshal(raw, &c); err != nil {
		return nil, err
	}
	for _, f := range fields(g.types[name]) {
		if !isFloat(f.typ) {
			continue
		}
		u := f.unit
		if u == "" {
			u = unit
		}
		np, err := number(c.Properties[f.name], &b, u, zero)
		if err != nil {
			return nil, fmt.Errorf("%s.%s: %w", name, f.name, err)
		}
		c.Properties[f.name] = np
	}
	return &c, nil
}

// number gives the number schema inside p (through lists and maps) the bound b
// (nil: none), the alternative of 0 when zero says when it is sent, and, for a
// unit other than "" and unitjson.UnitNone, the alternative of a string with a
// unit.
func number(p *openapi3.SchemaRef, b *facilities.Bound, unit, zero string) (*openapi3.SchemaRef, error) {
	v := p.Value
	if v == nil {
		return nil, fmt.Errorf("a reference where a number was expected")
	}
	switch {
	case v.Type.Is("array"):
		items, err := number(v.Items, b, unit, zero)
		if err != nil {
			return nil, err
		}
		v.Items = items
		return p, nil
	case v.Type.Is("object") && v.AdditionalProperties.Schema != nil:
		items, err := number(v.AdditionalProperties.Schema, b, unit, zero)
		if err != nil {
			return nil, err
		}
		v.AdditionalProperties.Schema = items
		return p, nil
	case !v.Type.Is("number") && !v.Type.Is("integer"):
		return nil, fmt.Errorf("a float whose schema is %v", v.Type)
	}
	if b != nil {
		lo, hi := b.Min, b.Max
		v.Min, v.Max = &lo, &hi
		if b.MinExclusive {
			v.ExclusiveMin = openapi3.ExclusiveBound{Bool: openapi3.Ptr(true)}
		}
		if b.MaxExclusive {
			v.ExclusiveMax = openapi3.ExclusiveBound{Bool: openapi3.Ptr(true)}
		}
		if b.Unit != "" {
			v.Extensions = map[string]any{"x-unit": b.Unit}
		}
	}
	withUnit := unit != "" && unit != unitjson.UnitNone
	if !withUnit && zero == "" {
		return p, nil
	}
	outer := &openapi3.Schema{
		Description: v.Description,
		Example:     v.Example,
		Nullable:    v.Nullable,
		OneOf:       openapi3.SchemaRefs{{Value: v}},
	}
	if zero != "" {
		outer.OneOf = append(outer.OneOf, &openapi3.SchemaRef{Value: &openapi3.Schema{
			Type: typ("number"), Enum: []any{0}, Description: zero,
		}})
	}
	if withUnit {
		text := &openapi3.Schema{Type: typ("string"), MinLength: 1}
		if unit == unitjson.UnitScale {
			text.Description = `a ratio of model to full scale, such as "1:16"`
		} else {
			text.Description = fmt.Sprintf("a number with a unit convertible to %s, such as %s", unit, unitExample(unit))
		}
		outer.OneOf = append(outer.OneOf, &openapi3.SchemaRef{Value: text})
	}
	v.Description, v.Example, v.Nullable = "", nil, false
	return &openapi3.SchemaRef{Value: outer}, nil
}

// unitExample is an example of a unit string for a field in unit.
func unitExample(unit string) string {
	if e, ok := unitExamples[unit]; ok {
		return strconv.Quote(e)
	}
	return strconv.Quote("1 " + unit)
}

// problems documents every problem kind as an application/problem+json response
// and puts on every operation the problems it can answer, and the headers every
// answer carries.
func (g *generator) problems() error {
	comps := g.doc.Components
	if comps.Headers == nil {
		comps.Headers = openapi3.Headers{}
	}
	for name, h := range responseHeaders {
		comps.Headers[name] = &openapi3.HeaderRef{Value: h.header()}
	}
	kinds := map[int]api.ProblemKind{}
	for _, k := range api.ProblemKinds() {
		why, ok := problemWhy[k.Status]
		if !ok {
			return fmt.Errorf("the problem kind %s (%d) has no description in problemWhy", k.Type, k.Status)
		}
		kinds[k.Status] = k
		slug := strings.TrimPrefix(k.Type, "/problems/")
		comps.Schemas["problem."+slug] = &openapi3.SchemaRef{Value: &openapi3.Schema{
			Description: fmt.Sprintf("The problem %s: %s.", slug, why),
			AllOf: openapi3.SchemaRefs{
				{Ref: "#/components/schemas/schema.Problem"},
				{Value: &openapi3.Schema{
					Type: &openapi3.Types{"object"},
					Properties: openapi3.Schemas{
						"type":   {Value: &openapi3.Schema{Type: &openapi3.Types{"string"}, Enum: []any{k.Type}}},
						"title":  {Value: &openapi3.Schema{Type: &openapi3.Types{"string"}, Enum: []any{k.Title}}},
						"status": {Value: &openapi3.Schema{Type: &openapi3.Types{"integer"}, Enum: []any{k.Status}}},
					},
				}},
			},
		}}
	}
	for status := range problemWhy {
		if _, ok := kinds[status]; !ok {
			return fmt.Errorf("problemWhy describes %d, which is no problem kind of the service", status)
		}
	}
	for p, item := range g.doc.Paths.Map() {
		for method, op := range item.Operations() {
			if err := g.operation(method, p, op, kinds); err != nil {
				return fmt.Errorf("%s %s: %w", method, p, err)
			}
		}
	}
	return nil
}

// operation replaces the operation's error responses with the problems, adds the
// ones the middleware answers, and puts the common headers on every response.
func (g *generator) operation(method, p string, op *openapi3.Operation, kinds map[int]api.ProblemKind) error {
	statuses := map[int]string{}
	for code, r := range op.Responses.Map() {
		n, err := strconv.Atoi(code)
		if err != nil {
			return fmt.Errorf("response %q is not a status", code)
		}
		if n >= 400 {
			statuses[n] = *r.Value.Description
			op.Responses.Delete(code)
		}
	}
	for _, rule := range extraStatuses {
		if !rule.applies(method, p, op) {
			continue
		}
		for _, st := range rule.statuses {
			if _, ok := statuses[st]; !ok {
				statuses[st] = rule.why
			}
		}
	}
	for code, r := range op.Responses.Map() {
		for mt, m := range r.Value.Content {
			// An answer that is not JSON (CSV, SVG, PNG, PDF, HTML, text) is a
			// string of bytes, whatever the annotation named for its JSON form.
			if mt != "application/json" && !strings.HasSuffix(mt, "+json") {
				m.Schema = &openapi3.SchemaRef{Value: &openapi3.Schema{Type: typ("string")}}
				if !strings.HasPrefix(mt, "text/") && mt != "image/svg+xml" {
					m.Schema.Value.Format = "binary"
				}
			}
		}
		n, _ := strconv.Atoi(code)
		for _, h := range headersFor(method, p, n) {
			if r.Value.Headers == nil {
				r.Value.Headers = openapi3.Headers{}
			}
			r.Value.Headers[h] = &openapi3.HeaderRef{Ref: "#/components/headers/" + h}
		}
	}
	if method == http.MethodGet && op.Responses.Status(http.StatusOK) != nil {
		op.Responses.Set("304", &openapi3.ResponseRef{Value: &openapi3.Response{
			Description: openapi3.Ptr("If-None-Match names the answer's entity tag: no body"),
			Headers:     g.headerRefs(method, p, http.StatusNotModified),
		}})
	}
	for st, why := range statuses {
		k, ok := kinds[st]
		if !ok {
			return fmt.Errorf("status %d is no problem kind of the service", st)
		}
		slug := strings.TrimPrefix(k.Type, "/problems/")
		op.Responses.Set(strconv.Itoa(st), &openapi3.ResponseRef{Value: &openapi3.Response{
			Description: openapi3.Ptr(fmt.Sprintf("%s (%s)", why, slug)),
			Headers:     g.headerRefs(method, p, st),
			Content: openapi3.Content{
				"application/problem+json": {Schema: &openapi3.SchemaRef{Ref: "#/components/schemas/problem." + slug}},
			},
		}})
	}
	return nil
}

func (g *generator) headerRefs(method, p string, status int) openapi3.Headers {
	hs := openapi3.Headers{}
	for _, h := range headersFor(method, p, status) {
		hs[h] = &openapi3.HeaderRef{Ref: "#/components/headers/" + h}
	}
	return hs
}
