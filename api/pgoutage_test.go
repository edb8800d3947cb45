package api_test

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"os/user"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/facilities/postgres"
	"scalematch/internal/testfixture"
)

// throwawayPostgres is a PostgreSQL server of the test's own: its own data
// directory and port, never the machine's shared server.
type throwawayPostgres struct {
	bin, data, sock string
	port            int
	asUser          []string // "runuser -u postgres --" when the test runs as root
}

// startThrowawayPostgres initialises and starts a server in a new temporary
// directory on a free port, and stops it when t ends. It skips the test when no
// PostgreSQL binaries are installed under /usr/lib/postgresql/*/bin.
func startThrowawayPostgres(t *testing.T) *throwawayPostgres {
	t.Helper()
	bins, _ := filepath.Glob("/usr/lib/postgresql/*/bin/initdb")
	if len(bins) == 0 {
		t.Skip("no PostgreSQL server binaries under /usr/lib/postgresql/*/bin (apt-get install postgresql): the outage test needs its own server")
	}
	pg := &throwawayPostgres{bin: filepath.Dir(bins[len(bins)-1])}
	// Not t.TempDir: its parent is private to this user, and PostgreSQL refuses to
	// run as root, so the directory must be reachable by the postgres user.
	dir, err := os.MkdirTemp("", "scalematch-pg-")
	require.NoError(t, err)
	t.Cleanup(func() { os.RemoveAll(dir) })
	if os.Geteuid() == 0 {
		u, err := user.Lookup("postgres")
		if err != nil {
			t.Skip("running as root without a postgres user to run the server as")
		}
		uid, _ := strconv.Atoi(u.Uid)
		gid, _ := strconv.Atoi(u.Gid)
		require.NoError(t, os.Chown(dir, uid, gid))
		pg.asUser = []string{"runuser", "-u", "postgres", "--"}
	}
	pg.data, pg.sock = filepath.Join(dir, "data"), dir
	l, err := net.Listen("tcp", "127.0.0.1:0")
	require.NoError(t, err)
	pg.port = l.Addr().(*net.TCPAddr).Port
	l.Close()
	pg.run(t, "initdb", "-D", pg.data, "-A", "trust", "-U", "postgres", "--no-sync", "-E", "UTF8")
	pg.start(t)
	t.Cleanup(func() { pg.ctl(t, "stop", "-m", "immediate") })
	return pg
}

func (pg *throwawayPostgres) run(t *testing.T, name string, args ...string) {
	t.Helper()
	argv := append(append([]string(nil), pg.asUser...), append([]string{filepath.Join(pg.bin, name)}, args...)...)
	out, err := exec.Command(argv[0], argv[1:]...).CombinedOutput()
	if !strings.Contains(string(out), "is not running") {
		require.NoError(t, err, "%s\n%s", strings.Join(argv, " "), out)
	}
}

func (pg *throwawayPostgres) ctl(t *testing.T, args ...string) {
	pg.run(t, "pg_ctl", append([]string{"-D", pg.data, "-w"}, args...)...)
}

func (pg *throwawayPostgres) start(t *testing.T) {
	pg.ctl(t, "-l", filepath.Join(pg.sock, "server.log"), "-o",
		fmt.Sprintf("-p %d -k %s -c listen_addresses=127.0.0.1 -c fsync=off", pg.port, pg.sock), "start")
}

func (pg *throwawayPostgres) url() string {
	return fmt.Sprintf("postgres://postgres@127.0.0.1:%d/postgres?sslmode=disable&connect_timeout=2", pg.port)
}

// TestPostgresOutage stops the service's PostgreSQL under load: every answer is
// a 200 or a 503 with Retry-After (it was 500 for 1,226 of 1,228), /readyz says
// 503, and once the server is back the service answers 200 again.
func TestPostgresOutage(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a PostgreSQL server of its own")
	}
	pg := startThrowawayPostgres(t)
	ctx := context.Background()
	db, err := postgres.Open(ctx, pg.url())
	require.NoError(t, err)
	t.Cleanup(func() { db.Close() })
	_, err = facilities.SeedDemo(ctx, db, true)
	require.NoError(t, err)
	logs := &testfixture.LogBuffer{}
	s, err := api.New(api.Config{Catalog: db, Registry: prometheus.NewRegistry(), Logger: slog.New(slog.NewJSONHandler(logs, nil))})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)

	var phase atomic.Int32 // 0 up, 1 stopped, 2 restarted
	var mu sync.Mutex
	statuses := map[int32]map[int]int{0: {}, 1: {}, 2: {}}
	var noRetryAfter atomic.Int32
	var seq atomic.Int64
	stop := make(chan struct{})
	var wg sync.WaitGroup
	for w := range 4 {
		wg.Go(func() {
			for {
				select {
				case <-stop:
					return
				default:
				}
				var resp *http.Response
				var err error
				if w%2 == 0 {
					// A new plan each time, so that every request writes.
					n := seq.Add(1)
					body := strings.Replace(testfixture.J16Plan, `"model_mass": 20`, fmt.Sprintf(`"model_mass": %g`, 20+float64(n)/1000), 1)
					resp, err = http.Post(ts.URL+"/v1/plans", "application/json", strings.NewReader(body))
				} else {
					resp, err = http.Get(ts.URL + "/v1/facilities/tsw-1")
				}
				if !assert.NoError(t, err, "request") {
					return
				}
				io.Copy(io.Discard, resp.Body)
				resp.Body.Close()
				p := phase.Load()
				mu.Lock()
				statuses[p][resp.StatusCode]++
				mu.Unlock()
				if resp.StatusCode == http.StatusServiceUnavailable && resp.Header.Get("Retry-After") == "" {
					noRetryAfter.Add(1)
				}
			}
		})
	}
	count := func(p int32, code int) int {
		mu.Lock()
		defer mu.Unlock()
		return statuses[p][code]
	}
	require.Eventually(t, func() bool { return count(0, 200) >= 20 }, 20*time.Second, 20*time.Millisecond)
	pg.ctl(t, "stop", "-m", "fast")
	phase.Store(1)
	require.Eventually(t, func() bool { return count(1, 503) >= 20 }, 20*time.Second, 20*time.Millisecond, "503s while stopped")
	resp, err := http.Get(ts.URL + "/readyz")
	require.NoError(t, err)
	resp.Body.Close()
	assert.Equal(t, http.StatusServiceUnavailable, resp.StatusCode, "/readyz while stopped")
	pg.start(t)
	phase.Store(2)
	require.Eventually(t, func() bool { return count(2, 200) >= 20 }, 30*time.Second, 20*time.Millisecond, "recovery after the restart")
	close(stop)
	wg.Wait()
	t.Logf("statuses by phase (up, stopped, restarted): %v", statuses)
	for p, m := range statuses {
		for code, n := range m {
			assert.Contains(t, []int{200, 503}, code, "phase %d: status of %d answers", p, n)
		}
	}
	assert.Zero(t, noRetryAfter.Load(), "503s without Retry-After")
	assert.NotContains(t, logs.String(), `"level":"ERROR"`)
}
