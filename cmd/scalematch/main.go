// Command scalematch plans scale-model tests in wind and water tunnels: the service
// (serve) and the same computations from the command line.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"

	"github.com/spf13/cobra"
)

func main() {
	if err := run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr); err != nil {
		fmt.Fprintln(os.Stderr, "scalematch:", err)
		os.Exit(exitStatus(err))
	}
}

// exitStatus is the process exit status for an error of run: a verdict's own
// status (verdict.go), else exitError.
func exitStatus(err error) int {
	if err == nil {
		return exitOK
	}
	var v verdictError
	if errors.As(err, &v) {
		return v.ExitCode()
	}
	return exitError
}

// run builds the command tree and executes it with the given arguments and streams;
// tests call it directly.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	root := newRootCmd()
	root.SetArgs(args)
	root.SetIn(stdin)
	root.SetOut(stdout)
	root.SetErr(stderr)
	return root.Execute()
}

func newRootCmd() *cobra.Command {
	root := &cobra.Command{
		Use:           "scalematch",
		Short:         "Plan scale-model tests in wind and water tunnels",
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	// Each command lives in its own file and is added here, one line each.
	root.AddCommand(
		newAtmosphereCmd(),
		newServeCmd(),
		newCheckCmd(),
		newFacilitiesCmd(),
		newPlanCmd(),
		newLoadsCmd(),
		newGroupsCmd(),
		newCampaignCmd(),
	// commands
	)
	return root
}
