package postgres_test

import (
	"context"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities/postgres"
	"scalematch/internal/jobs"
	"scalematch/internal/jobs/jobstest"
)

func TestJobs(t *testing.T) {
	jobstest.Run(t, func(tb testing.TB) func() jobs.Store {
		url := schemaURL(tb)
		return func() jobs.Store {
			db, err := postgres.Open(context.Background(), url)
			require.NoError(tb, err)
			tb.Cleanup(func() { require.NoError(tb, db.Close()) })
			return db
		}
	})
}
