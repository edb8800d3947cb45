package app

import (
	"fmt"

	"scalematch/api/schema"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// Groups reads each variable's unit or dimensions and returns its dimensionless
// groups (similarity.Groups), for POST /v1/groups and the command line.
func Groups(req *schema.GroupsRequest) (*schema.GroupsResponse, error) {
	var fe check.Fields
	if len(req.Variables) == 0 {
		fe.Add("variables", "give at least one variable: {\"name\": ..., \"unit\": ...}")
	}
	vars := make([]similarity.Variable, len(req.Variables))
	for i, v := range req.Variables {
		path := fmt.Sprintf("variables[%d]", i)
		vars[i].Name = v.Name
		switch {
		case v.Unit != "" && v.Dimensions != "":
			fe.Add(path+".dimensions", "give unit or dimensions, not both")
		case v.Unit != "":
			u, err := similarity.ParseUnit(v.Unit)
			if err != nil {
				fe.Add(path+".unit", "%s", err.Error())
				continue
			}
			vars[i].Dim = u.Dim
		case v.Dimensions != "":
			d, err := similarity.ParseDimension(v.Dimensions)
			if err != nil {
				fe.Add(path+".dimensions", "%s", err.Error())
				continue
			}
			vars[i].Dim = d
		default:
			fe.Add(path+".unit", "give the variable's unit (\"kg/m^3\") or its dimensions (\"M L^-3\")")
		}
	}
	if err := fe.Err(); err != nil {
		return nil, err
	}
	res, err := similarity.Groups(vars, req.Repeating)
	if err != nil {
		return nil, err
	}
	if res.Groups == nil {
		res.Groups = []similarity.Group{}
	}
	return &res, nil
}
