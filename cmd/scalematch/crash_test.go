package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/sqlite"
)

const crashToken = "crash-test-token"

// crashServer is one run of the built binary.
type crashServer struct {
	cmd  *exec.Cmd
	base string
	log  *bytes.Buffer
}

func freeAddr(t *testing.T) string {
	t.Helper()
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	require.NoError(t, err)
	defer ln.Close()
	return ln.Addr().String()
}

func startServer(t *testing.T, bin, data string) *crashServer {
	t.Helper()
	addr := freeAddr(t)
	cmd := exec.Command(bin, "serve", "--addr", addr, "--data", data)
	cmd.Env = append(os.Environ(), "SCALEMATCH_WRITE_TOKENS=crash:"+crashToken, "SCALEMATCH_DATABASE_URL=")
	var log bytes.Buffer
	cmd.Stdout, cmd.Stderr = &log, &log
	require.NoError(t, cmd.Start())
	s := &crashServer{cmd: cmd, base: "http://" + addr, log: &log}
	deadline := time.Now().Add(20 * time.Second)
	for {
		resp, err := http.Get(s.base + "/readyz")
		if err == nil {
			resp.Body.Close()
			if resp.StatusCode == http.StatusOK {
				return s
			}
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			cmd.Wait()
			require.FailNow(t, "the server did not become ready", "%v\n%s", err, log.String())
		}
		time.Sleep(50 * time.Millisecond)
	}
}

func (s *crashServer) do(method, path, ifMatch, body string) (int, http.Header, []byte, error) {
	req, err := http.NewRequest(method, s.base+path, bytes.NewBufferString(body))
	if err != nil {
		return 0, nil, nil, err
	}
	req.Header.Set("Authorization", "Bearer "+crashToken)
	req.Header.Set("Content-Type", "application/json")
	if ifMatch != "" {
		req.Header.Set("If-Match", ifMatch)
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		return 0, nil, nil, err
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	return resp.StatusCode, resp.Header, b, err
}

// planRequest is a valid plan request (the business jet of the demo world in the
// transonic tunnel); mach varies so each writer's plans differ.
func planRequest(mach float64) string {
	return fmt.Sprintf(`{"flight":{"altitude":"12000 m","mach":%.4f},
"article":{"reference_length":2.4,"reference_area":36.5,"span":16.4,"frontal_area":4.4,"wetted_area":228,"form_factor":1.2,
"aero":{"lift_slope":4.9,"zero_lift_alpha":-1.6,"cl_max":1.25,"cd_min":0.022,"cl_at_cd_min":0.14,"induced_drag_factor":0.057,"cm_zero":0.03,"cm_slope":-1.05}},
"facility_id":"tsw-1","model":{"scale_min":0.02,"scale_max":0.06},"alpha":{"from":-2,"to":8,"step":2}}`, mach)
}

// TestCrashKeepsAcknowledgedWrites builds the binary, writes to it from several
// clients, kills it with SIGKILL in mid-stream, restarts it on the same data
// directory and checks that every write it acknowledged is there.
func TestCrashKeepsAcknowledgedWrites(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary and kills it: skipped under -short")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "scalematch")
	build := exec.Command("go", "build", "-o", bin, ".")
	out, err := build.CombinedOutput()
	require.NoError(t, err, "go build: %s", out)
	data := filepath.Join(dir, "data")
	srv := startServer(t, bin, data)

	var mu sync.Mutex
	created := map[string]int{}  // facility id → last acknowledged version
	names := map[string]string{} // facility id → name at that version
	plans := map[string][]byte{} // plan id → body as answered
	stop := make(chan struct{})
	var wg sync.WaitGroup
	const writers = 4
	for w := 0; w < writers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			for i := 0; ; i++ {
				select {
				case <-stop:
					return
				default:
				}
				id := fmt.Sprintf("crash-%d-%d", w, i)
				f, _ := facilities.DemoFacility("lsw-2")
				f.ID, f.Name, f.Version = id, "created", 0 // no version in the body: If-Match carries it
				body, _ := json.Marshal(f)
				status, _, _, err := srv.do(http.MethodPost, "/v1/facilities", "", string(body))
				if err != nil || !assert.Equal(t, http.StatusCreated, status, "create %s: status", id) {
					return // an error is the kill cutting the request
				}
				mu.Lock()
				created[id], names[id] = 1, f.Name
				mu.Unlock()
				for v := 1; v <= 2; v++ {
					f.Name = "edit " + strconv.Itoa(v)
					body, _ = json.Marshal(f)
					status, _, _, err := srv.do(http.MethodPut, "/v1/facilities/"+id, `"`+strconv.Itoa(v)+`"`, string(body))
					if err != nil || !assert.Equal(t, http.StatusOK, status, "update %s: status", id) {
						return // an error is the kill cutting the request
					}
					mu.Lock()
					created[id], names[id] = v+1, f.Name
					mu.Unlock()
				}
				status, _, pb, err := srv.do(http.MethodPost, "/v1/plans", "", planRequest(0.70+0.001*float64(w*1000+i)/100))
				if err != nil {
					return
				}
				if status == http.StatusOK {
					var p struct {
						ID string `json:"id"`
					}
					if json.Unmarshal(pb, &p) == nil && p.ID != "" {
						mu.Lock()
						plans[p.ID] = pb
						mu.Unlock()
					}
				}
			}
		}(w)
	}
	time.Sleep(1500 * time.Millisecond)
	require.NoError(t, srv.cmd.Process.Signal(syscall.SIGKILL))
	srv.cmd.Wait()
	close(stop)
	wg.Wait()

	mu.Lock()
	defer mu.Unlock()
	require.NotEmpty(t, created, "no write was acknowledged before the kill\n%s", srv.log.String())
	t.Logf("acknowledged before SIGKILL: %d facilities, %d plans", len(created), len(plans))

	// The store opens cleanly on its own...
	db, err := sqlite.Open(context.Background(), sqlite.Path(data))
	require.NoError(t, err, "the store does not open after the kill")
	require.NoError(t, db.Ping(context.Background()))
	db.Close()

	// ...and through a restarted server every acknowledged write is there.
	srv = startServer(t, bin, data)
	defer func() {
		srv.cmd.Process.Signal(syscall.SIGTERM)
		srv.cmd.Wait()
	}()
	for id, version := range created {
		status, h, body, err := srv.do(http.MethodGet, "/v1/facilities/"+id, "", "")
		if !assert.NoError(t, err, "facility %s acknowledged at version %d", id, version) ||
			!assert.Equal(t, http.StatusOK, status, "facility %s acknowledged at version %d is missing", id, version) {
			continue
		}
		// A write cut after commit but before its answer may be one version ahead.
		got, _ := strconv.Atoi(string(bytes.Trim([]byte(h.Get("ETag")), `"`)))
		assert.GreaterOrEqual(t, got, version, "facility %s: version against the acknowledged one", id)
		var f facilities.Facility
		if assert.NoError(t, json.Unmarshal(body, &f), "facility %s", id) && got == version {
			assert.Equal(t, names[id], f.Name, "facility %s at version %d: name against the acknowledged one", id, version)
		}
	}
	for id, want := range plans {
		status, _, body, err := srv.do(http.MethodGet, "/v1/plans/"+id, "", "")
		if assert.NoError(t, err, "plan %s acknowledged before the kill", id) &&
			assert.Equal(t, http.StatusOK, status, "plan %s acknowledged before the kill", id) {
			assert.Equal(t, string(want), string(body), "plan %s: body against the acknowledged one", id)
		}
	}
}
