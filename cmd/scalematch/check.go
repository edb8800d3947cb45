package main

import (
	"errors"
	"fmt"
	"os"
	"time"

	"github.com/spf13/cobra"

	"scalematch/facilities/sqlite"
)

func newCheckCmd() *cobra.Command {
	var data string
	cmd := &cobra.Command{
		Use:   "check",
		Short: "Check the SQLite catalog file for damage",
		Long: `Run SQLite's full integrity check (PRAGMA integrity_check, every page and every
index against its table, and PRAGMA foreign_key_check) over the catalog under
--data, and exit non-zero naming the first problems when the file is damaged.
serve runs the quicker PRAGMA quick_check at every start. The check only reads;
it may run beside a serving instance. Restore a damaged catalog from a backup
(docs/deployment.md).`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := flagsFromEnv(cmd.Flags(), os.LookupEnv); err != nil {
				return err
			}
			path := sqlite.Path(data)
			if _, err := os.Stat(path); err != nil {
				if errors.Is(err, os.ErrNotExist) {
					return fmt.Errorf("no catalog at %s", path)
				}
				return err
			}
			db, err := sqlite.Open(cmd.Context(), path)
			if err != nil {
				return fmt.Errorf("%s: %w", path, err)
			}
			defer db.Close()
			t := time.Now()
			if err := db.IntegrityCheck(cmd.Context()); err != nil {
				return fmt.Errorf("%s: %w", path, err)
			}
			fmt.Fprintf(cmd.OutOrStdout(), "%s: ok (integrity check, %.1f ms)\n", path, float64(time.Since(t).Microseconds())/1000)
			return nil
		},
	}
	cmd.Flags().StringVar(&data, "data", "./scalematch-data", "directory of the SQLite catalog")
	return cmd
}
