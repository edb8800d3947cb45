package api

import (
	"fmt"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/similarity"
)

// postGroups answers POST /v1/groups.
//
//	@Summary		Dimensionless groups (Buckingham Π)
//	@Description	The rank of the variables' dimension matrix and the n − rank independent dimensionless groups (Buckingham 1914), each with its exponents as small integers or exact fractions ("1/2") and its usual name when recognised. Each variable gives a unit ("N", "kg/m^3", "Pa*s") or a dimension over M L T Θ ("M L^-1 T^-1"). repeating optionally names the repeating variables.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		GroupsRequest	true	"variables with unit or dimensions; optional repeating"
//	@Success		200		{object}	GroupsResponse
//	@Failure		400		{object}	Problem	"bad input: every bad field named by its JSON path"
//	@Router			/v1/groups [post]
func (s *Server) postGroups(c *gin.Context) {
	var req GroupsRequest
	if !s.decodeBody(c, &req) {
		return
	}
	resp, err := Groups(&req)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, resp)
}

// Groups reads each variable's unit or dimensions and returns its dimensionless
// groups (similarity.Groups), for POST /v1/groups and the command line.
func Groups(req *GroupsRequest) (*GroupsResponse, error) {
	var fe fieldErrors
	if len(req.Variables) == 0 {
		fe.add("variables", "give at least one variable: {\"name\": ..., \"unit\": ...}")
	}
	vars := make([]similarity.Variable, len(req.Variables))
	for i, v := range req.Variables {
		path := fmt.Sprintf("variables[%d]", i)
		vars[i].Name = v.Name
		switch {
		case v.Unit != "" && v.Dimensions != "":
			fe.add(path+".dimensions", "give unit or dimensions, not both")
		case v.Unit != "":
			u, err := similarity.ParseUnit(v.Unit)
			if err != nil {
				fe.add(path+".unit", "%s", err.Error())
				continue
			}
			vars[i].Dim = u.Dim
		case v.Dimensions != "":
			d, err := similarity.ParseDimension(v.Dimensions)
			if err != nil {
				fe.add(path+".dimensions", "%s", err.Error())
				continue
			}
			vars[i].Dim = d
		default:
			fe.add(path+".unit", "give the variable's unit (\"kg/m^3\") or its dimensions (\"M L^-3\")")
		}
	}
	if err := fe.err(); err != nil {
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
