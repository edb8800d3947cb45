package app

import (
	"context"
	"strings"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// ResolveFacility resolves a facility given inline (validated) or by catalog id,
// as a plan request's facility and facility_id are, for callers that plan many
// conditions in several facilities (internal/campaign). Problems are added to fe
// under prefix ("facilities[1]" gives "facilities[1].facility_id"); a facility_id
// that names nothing joins fe too when fe holds other problems, and is returned
// as a CodeNotFound error otherwise. The facility is nil when fe got a problem.
func (p *Planner) ResolveFacility(ctx context.Context, inline *facilities.Facility, id, prefix string, fe *check.Fields) (*facilities.Facility, error) {
	var own check.Fields
	f, err := p.facility(ctx, inline, id, &own)
	if err := notFoundOrFail(err, &own, "facility_id"); err != nil {
		if check.ErrorCode(err) == check.CodeNotFound && len(*fe) > 0 {
			fe.Add(check.JoinPath(prefix, "facility_id"), "%s", err.Error())
			return nil, nil
		}
		return nil, err
	}
	for _, e := range own {
		fe.Add(check.JoinPath(prefix, e.Field), "%s", e.Message)
	}
	if len(own) > 0 {
		return nil, nil
	}
	return f, nil
}

// CheckArticle adds the problems of a full-scale article (geometry, friction
// inputs, aerodynamic estimate) to fe, named as in a plan request ("article.span").
func CheckArticle(a *similarity.Article, fe *check.Fields) { checkArticle(a, fe) }

// CheckInstallation adds the problems of an installation in facility f (nil when
// unresolved) to fe, under prefix ("facilities[0]" gives
// "facilities[0].installation.balance_id").
func CheckInstallation(in *loads.Installation, f *facilities.Facility, prefix string, fe *check.Fields) {
	var own check.Fields
	checkInstallation(in, f, &own)
	for _, e := range own {
		fe.Add(check.JoinPath(prefix, e.Field), "%s", e.Message)
	}
}

// ValidateFlight checks a full-scale flight condition as a plan request's is;
// the error names fields relative to the flight ("altitude", "mach").
func ValidateFlight(fl *similarity.Flight) error {
	err := fl.Validate()
	if de, ok := err.(*check.Error); ok && de.Code == check.CodeInvalid {
		out := *de
		out.Fields = make([]check.FieldError, len(de.Fields))
		for i, f := range de.Fields {
			f.Field = strings.TrimPrefix(f.Field, "flight.")
			out.Fields[i] = f
		}
		return &out
	}
	return err
}
