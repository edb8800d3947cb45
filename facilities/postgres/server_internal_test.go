package postgres

import (
	"net"
	"net/url"
	"os"
	"testing"
	"time"

	"github.com/stretchr/testify/require"
)

const defaultURL = "postgres://postgres@127.0.0.1:5432/test?sslmode=disable"

// serverURL returns the test database URL, skipping the test only when no server
// answers at its address.
func serverURL(t testing.TB) string {
	t.Helper()
	raw := os.Getenv("SCALEMATCH_TEST_DATABASE_URL")
	if raw == "" {
		raw = defaultURL
	}
	u, err := url.Parse(raw)
	require.NoError(t, err, "SCALEMATCH_TEST_DATABASE_URL")
	host := u.Host
	if u.Port() == "" {
		host = net.JoinHostPort(u.Hostname(), "5432")
	}
	conn, err := net.DialTimeout("tcp", host, 3*time.Second)
	if err != nil {
		t.Skipf("no PostgreSQL server reachable at %s (set SCALEMATCH_TEST_DATABASE_URL): %v", host, err)
	}
	conn.Close()
	return raw
}

// ServerURL is serverURL for the package's external tests.
var ServerURL = serverURL
