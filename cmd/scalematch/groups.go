package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"scalematch/api/schema"
	"scalematch/internal/app"
	"scalematch/internal/unitjson"
)

func newGroupsCmd() *cobra.Command {
	var o computeOptions
	cmd := &cobra.Command{
		Use:   "groups FILE|-",
		Short: "Find the dimensionless groups of a list of variables (the JSON of POST /v1/groups)",
		Long: `Find the independent dimensionless groups of a list of variables by the
Buckingham Π theorem: read the JSON body POST /v1/groups takes ({"variables":
[{"name": "rho", "unit": "kg/m^3"}, ...], "repeating": [...]}) from FILE or, for
"-", from standard input.

By default the rank of the dimension matrix, the repeating variables and each
group as a product of powers with its usual name when it has one. --json prints
exactly the body POST /v1/groups returns.`,
		Example: `  scalematch groups drag.json
  echo '{"variables": [{"name": "V", "unit": "m/s"}, {"name": "g", "unit": "m/s^2"}, {"name": "L", "unit": "m"}]}' | scalematch groups -`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			body, err := o.start(cmd, args[0])
			if err != nil {
				return err
			}
			var req schema.GroupsRequest
			if err := unitjson.Decode(body, &req); err != nil {
				return explain(err)
			}
			resp, err := app.Groups(&req)
			if err != nil {
				return explain(err)
			}
			if o.json {
				return writeAPIJSON(o.stdout, resp)
			}
			return writeGroups(o.stdout, resp)
		},
	}
	o.bind(cmd, false, "POST /v1/groups")
	return cmd
}

// writeGroups prints the groups, one a line, as products of powers.
func writeGroups(w io.Writer, r *schema.GroupsResponse) error {
	fmt.Fprintf(w, "rank %d; repeating variables: %s\n", r.Rank, strings.Join(r.Repeating, ", "))
	if len(r.Groups) == 0 {
		_, err := fmt.Fprintln(w, "no dimensionless group: every variable is a repeating one")
		return err
	}
	for i, g := range r.Groups {
		name := ""
		if g.KnownAs != "" {
			name = "  (" + g.KnownAs + ")"
		}
		if _, err := fmt.Fprintf(w, "  Π%d = %s%s\n", i+1, g, name); err != nil {
			return err
		}
	}
	return nil
}
