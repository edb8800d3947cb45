// Command loadtest measures how many plans per second a scalematch server answers,
// against how many health checks per second the same server answers in the same
// run, so the planner's cost shows apart from the HTTP stack's.
//
// Run it against a server on this machine (loopback addresses only):
//
//	scalematch serve --addr 127.0.0.1:8080 &
//	go run ./api/loadtest -url http://127.0.0.1:8080 -duration 20s -concurrency 4
//
// or let it start its own server in-process, on a temporary SQLite store seeded
// with the demo facilities (or, when SCALEMATCH_DATABASE_URL is set, on that
// PostgreSQL database; the schema its search_path names must exist):
//
//	go run ./api/loadtest -serve -duration 20s
//
// The plan request is the Orrin J16 in tsw-1 with a 21-point α sweep
// (api/testdata/load/plan-orrin-j16-tsw-1.json; -plan names another). The duration
// is shared evenly by three phases on the same server, which take turns in slices
// of about half a second:
//
//   - repeated: POST /v1/plans of that one request; after the first it is a stored
//     plan, which the service answers with the stored bytes after decoding and
//     validating the request and computing its id;
//   - distinct: POST /v1/plans with the flight altitude raised by 1 µm per
//     request, from a start drawn at random for each run (at most 10 m up), so
//     that every request is a new plan that is planned and stored, also on a
//     database that earlier runs stored plans in (-vary=false leaves this
//     phase out);
//   - health: GET /healthz, the HTTP stack alone.
//
// It prints requests per second, latency percentiles, the count of answers that
// were not 200 and the process's CPU time per request (with -serve, server and
// load generator together) for each phase, and each plan phase's rate as a percentage of the
// health checks'; with -serve also the ratio of a health check's CPU time to a
// plan's (where the process runs short of CPU, as on a machine shared with other
// work, a plan phase's share is about that ratio, and a share well below it is
// time spent waiting; over PostgreSQL the server's backends' CPU is not in it),
// and how many group commits stored the distinct plans and
// how many records each held on average. -cpuprofile writes a CPU profile of the whole run (with -serve,
// server and load generator together); -only distinct (or repeated, health) runs
// that phase alone, so that the profile is of it alone.
package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"math/rand/v2"
	"net"
	"net/http"
	"net/url"
	"os"
	"runtime/pprof"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/prometheus/client_golang/prometheus"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/facilities/postgres"
	"scalematch/facilities/sqlite"
)

func main() {
	if err := run(os.Args[1:], os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "loadtest:", err)
		os.Exit(1)
	}
}

// maxDuration bounds a run.
const maxDuration = 10 * time.Minute

func run(args []string, out io.Writer) error {
	fs := flag.NewFlagSet("loadtest", flag.ContinueOnError)
	base := fs.String("url", "http://127.0.0.1:8080", "base URL of the server (loopback only)")
	serve := fs.Bool("serve", false, "start a server in-process on 127.0.0.1 instead of using -url")
	duration := fs.Duration("duration", 20*time.Second, "total run time, split evenly between plans and health checks")
	concurrency := fs.Int("concurrency", 4, "requests in flight at once")
	planFile := fs.String("plan", "api/testdata/load/plan-orrin-j16-tsw-1.json", "plan request body")
	vary := fs.Bool("vary", true, "also send distinct plan requests (the flight altitude raised by 1 µm each, from a random start)")
	cpuProfile := fs.String("cpuprofile", "", "write a CPU profile of the run to this file")
	only := fs.String("only", "", "run only this phase (repeated, distinct or health), so that -cpuprofile profiles it alone; no ratio is printed")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *duration <= 0 || *duration > maxDuration {
		return fmt.Errorf("-duration %v: want more than 0 and at most %v", *duration, maxDuration)
	}
	if *concurrency < 1 || *concurrency > 256 {
		return fmt.Errorf("-concurrency %d: want 1 to 256", *concurrency)
	}
	plan, err := os.ReadFile(*planFile)
	if err != nil {
		return err
	}
	if *only != "" && !slices.Contains([]string{"repeated", "distinct", "health"}, *only) {
		return fmt.Errorf("-only %q: want repeated, distinct or health", *only)
	}
	var distinct *varied
	if *vary || *only == "distinct" {
		if distinct, err = newVaried(plan, rand.Int64N(startSteps)); err != nil {
			return fmt.Errorf("-plan %s: %w", *planFile, err)
		}
	}
	if *cpuProfile != "" {
		f, err := os.Create(*cpuProfile)
		if err != nil {
			return err
		}
		defer f.Close()
		if err := pprof.StartCPUProfile(f); err != nil {
			return err
		}
		defer pprof.StopCPUProfile()
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var store planGrouper
	if *serve {
		addr, stop, db, err := startServer(ctx)
		if err != nil {
			return err
		}
		defer stop()
		*base = "http://" + addr
		store = db
	}
	if err := checkLoopback(*base); err != nil {
		return err
	}
	client := &http.Client{
		Timeout: 30 * time.Second,
		// Buffers that take a whole plan answer (about 20 kB) in one read, so that the
		// load generator, which shares the machine with an in-process server, spends
		// as little as it can.
		Transport: &http.Transport{MaxIdleConnsPerHost: *concurrency, MaxConnsPerHost: *concurrency,
			ReadBufferSize: 64 << 10, WriteBufferSize: 16 << 10},
	}
	// One plan first, so that a wrong request or facility fails at once.
	if status, body, err := once(client, *base, "POST", "/v1/plans", plan); err != nil {
		return err
	} else if status != http.StatusOK {
		return fmt.Errorf("POST /v1/plans answered %d: %s", status, body)
	}
	phases := []phase{{name: "repeated  POST /v1/plans", method: "POST", path: "/v1/plans", body: fixed(plan)}}
	if distinct != nil {
		phases = append(phases, phase{name: "distinct  POST /v1/plans", method: "POST", path: "/v1/plans", body: distinct.next})
	}
	phases = append(phases, phase{name: "health    GET /healthz  ", method: "GET", path: "/healthz", body: fixed(nil)})
	if *only != "" {
		phases = slices.DeleteFunc(phases, func(p phase) bool { return !strings.HasPrefix(p.name, *only+" ") })
	}
	each := *duration / time.Duration(len(phases))
	fmt.Fprintf(out, "server %s, %d in flight, %v each\n", *base, *concurrency, each)
	// The phases take turns in slices of about half a second, so that whatever
	// else runs on the machine meanwhile weighs on each of them alike.
	rounds := max(1, int(each/(500*time.Millisecond)))
	results := make([]result, len(phases))
	var groups, records int64 // the distinct phase's group commits (-serve)
	for range rounds {
		for i, p := range phases {
			var g0, r0 int64
			if store != nil {
				g0, r0 = store.PlanGroups()
			}
			c0 := cpuTime()
			r := hammer(client, *base, p.method, p.path, p.body, *concurrency, each/time.Duration(rounds))
			r.cpu = cpuTime() - c0
			results[i].add(r)
			if store != nil && strings.HasPrefix(p.name, "distinct ") {
				g1, r1 := store.PlanGroups()
				groups, records = groups+g1-g0, records+r1-r0
			}
		}
	}
	rates := make([]float64, len(phases))
	for i, p := range phases {
		r := results[i]
		slices.Sort(r.latencies)
		rates[i] = float64(r.n) / r.elapsed.Seconds()
		fmt.Fprintf(out, "%s  %8.1f /s  %7d requests  %d not 200  latency p50 %v  p90 %v  p99 %v  CPU %.0f µs/request\n",
			p.name, rates[i], r.n, r.failed,
			r.percentile(0.50), r.percentile(0.90), r.percentile(0.99), r.cpuPerRequest())
	}
	if *only == "" {
		health := rates[len(rates)-1]
		fmt.Fprintf(out, "plans per health check: repeated %.1f %%", 100*rates[0]/health)
		if distinct != nil {
			fmt.Fprintf(out, ", distinct %.1f %%", 100*rates[1]/health)
		}
		fmt.Fprintln(out)
		if *serve {
			// Where the process runs short of CPU, a plan phase's share is about
			// this ratio; a share well below it is time the phase spent waiting
			// (or, over PostgreSQL, its backends' CPU, which is not the process's).
			hc := results[len(results)-1].cpuPerRequest()
			fmt.Fprintf(out, "CPU of a health check per CPU of a plan: repeated %.1f %%", 100*hc/results[0].cpuPerRequest())
			if distinct != nil {
				fmt.Fprintf(out, ", distinct %.1f %%", 100*hc/results[1].cpuPerRequest())
			}
			fmt.Fprintln(out)
		}
	}
	if groups > 0 {
		fmt.Fprintf(out, "distinct plans stored in %d group commits, %.2f records each on average\n",
			groups, float64(records)/float64(groups))
	}
	return nil
}

// phase is one part of a run: a request sent over and over.
type phase struct {
	name, method, path string
	// body returns the body of the next request (nil: none).
	body func() []byte
}

// fixed returns a body function that always gives b.
func fixed(b []byte) func() []byte { return func() []byte { return b } }

// varied makes distinct plan requests from one: the same request with the flight
// altitude raised by altitudeStep more on each, so every request is a new plan.
type varied struct {
	prefix, suffix []byte
	altitude       float64 // m
	start          int64   // steps above altitude before the first request
	n              atomic.Int64
}

// altitudeStep is how much higher each distinct request flies than the one
// before, in m.
const altitudeStep = 1e-6

// startSteps bounds the random start of a run's distinct requests (10 m): the
// sequence of one run is not that of the runs before, whose plans a PostgreSQL
// database may still hold (those would be answered as stored, not planned and
// stored anew). Two runs of 10 000 requests overlap with probability about
// 0.2 %.
const startSteps = 10_000_000

// altitudeMark stands for the altitude while the request is re-encoded.
const altitudeMark = "\x00altitude\x00"

// newVaried reads the plan request body: its flight.altitude must be a number in m
// or a string "<number> m". The first request flies start+1 steps higher.
func newVaried(body []byte, start int64) (*varied, error) {
	var req map[string]any
	if err := json.Unmarshal(body, &req); err != nil {
		return nil, err
	}
	flight, ok := req["flight"].(map[string]any)
	if !ok {
		return nil, errors.New("no flight object to vary")
	}
	v := &varied{start: start}
	switch alt := flight["altitude"].(type) {
	case float64:
		v.altitude = alt
	case string:
		num, ok := strings.CutSuffix(strings.TrimSpace(alt), " m")
		f, err := strconv.ParseFloat(num, 64)
		if !ok || err != nil {
			return nil, fmt.Errorf("flight.altitude %q: want a number or \"<number> m\" to vary", alt)
		}
		v.altitude = f
	default:
		return nil, errors.New("flight.altitude is missing: want a number or \"<number> m\" to vary")
	}
	flight["altitude"] = altitudeMark
	b, err := json.Marshal(req)
	if err != nil {
		return nil, err
	}
	mark, _ := json.Marshal(altitudeMark)
	i := bytes.Index(b, mark)
	v.prefix, v.suffix = b[:i], b[i+len(mark):]
	return v, nil
}

// next returns the next distinct request.
func (v *varied) next() []byte {
	alt := v.altitude + altitudeStep*float64(v.start+v.n.Add(1))
	b := make([]byte, 0, len(v.prefix)+len(v.suffix)+24)
	b = append(b, v.prefix...)
	b = strconv.AppendFloat(b, alt, 'f', -1, 64)
	return append(b, v.suffix...)
}

// checkLoopback refuses a base URL whose host is not a loopback address.
func checkLoopback(base string) error {
	u, err := url.Parse(base)
	if err != nil {
		return err
	}
	if u.Scheme != "http" && u.Scheme != "https" {
		return fmt.Errorf("-url %q: want http:// or https://", base)
	}
	ips, err := net.LookupIP(u.Hostname())
	if err != nil {
		return err
	}
	for _, ip := range ips {
		if !ip.IsLoopback() {
			return fmt.Errorf("-url %q: %s is not a loopback address; this tool loads local servers only", base, ip)
		}
	}
	return nil
}

// planGrouper is a store that counts its group commits of plans (both engines).
type planGrouper interface {
	facilities.Catalog
	PlanGroups() (groups, records int64)
	Close() error
}

// openStore opens the in-process server's store: the PostgreSQL database that
// SCALEMATCH_DATABASE_URL names (its schema, from search_path, must exist), or
// else a temporary SQLite file; cleanup closes it and removes the file.
func openStore(ctx context.Context) (db planGrouper, cleanup func(), err error) {
	if url := os.Getenv("SCALEMATCH_DATABASE_URL"); url != "" {
		pg, err := postgres.Open(ctx, url)
		if err != nil {
			return nil, nil, err
		}
		return pg, func() { pg.Close() }, nil
	}
	dir, err := os.MkdirTemp("", "scalematch-load-")
	if err != nil {
		return nil, nil, err
	}
	lite, err := sqlite.Open(ctx, sqlite.Path(dir))
	if err != nil {
		os.RemoveAll(dir)
		return nil, nil, err
	}
	return lite, func() { lite.Close(); os.RemoveAll(dir) }, nil
}

// startServer serves the API on 127.0.0.1 over openStore's store, seeded with the
// demo facilities; stop shuts it down and closes the store.
func startServer(ctx context.Context) (addr string, stop func(), db planGrouper, err error) {
	db, cleanup, err := openStore(ctx)
	if err != nil {
		return "", nil, nil, err
	}
	if _, err := facilities.SeedDemo(ctx, db, true); err != nil {
		cleanup()
		return "", nil, nil, err
	}
	srv, err := api.New(api.Config{Catalog: db, Registry: prometheus.NewRegistry(),
		Logger: slog.New(slog.NewJSONHandler(io.Discard, nil))})
	if err != nil {
		cleanup()
		return "", nil, nil, err
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		cleanup()
		return "", nil, nil, err
	}
	sctx, cancel := context.WithCancel(ctx)
	done := make(chan error, 1)
	go func() { done <- srv.Serve(sctx, ln) }()
	return ln.Addr().String(), func() { cancel(); <-done; cleanup() }, db, nil
}

func once(c *http.Client, base, method, path string, body []byte) (int, []byte, error) {
	var r io.Reader
	if body != nil {
		r = bytes.NewReader(body)
	}
	req, err := http.NewRequest(method, base+path, r)
	if err != nil {
		return 0, nil, err
	}
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	resp, err := c.Do(req)
	if err != nil {
		return 0, nil, err
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	return resp.StatusCode, b, err
}

// send sends one request and reads its answer to the end, keeping nothing of it
// but the status.
func send(c *http.Client, base, method, path string, body []byte) (int, error) {
	var r io.Reader
	if body != nil {
		r = bytes.NewReader(body)
	}
	req, err := http.NewRequest(method, base+path, r)
	if err != nil {
		return 0, err
	}
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	resp, err := c.Do(req)
	if err != nil {
		return 0, err
	}
	defer resp.Body.Close()
	_, err = io.Copy(io.Discard, resp.Body)
	return resp.StatusCode, err
}

type result struct {
	n, failed int
	elapsed   time.Duration
	// cpu is the CPU time (user and system) this process spent during the run:
	// the load generator's, and with -serve the server's too.
	cpu       time.Duration
	latencies []time.Duration // sorted before percentile is called
}

// add adds the requests and time of another run to r.
func (r *result) add(o result) {
	r.n += o.n
	r.failed += o.failed
	r.elapsed += o.elapsed
	r.cpu += o.cpu
	r.latencies = append(r.latencies, o.latencies...)
}

// cpuPerRequest returns the process's CPU time per request in µs (0 without
// requests).
func (r result) cpuPerRequest() float64 {
	if r.n == 0 {
		return 0
	}
	return float64(r.cpu.Microseconds()) / float64(r.n)
}

// cpuTime returns the CPU time, user and system, this process has used so far
// (0 where getrusage fails).
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// percentile returns the latency below which the fraction q of requests finished.
func (r result) percentile(q float64) time.Duration {
	if len(r.latencies) == 0 {
		return 0
	}
	i := int(q * float64(len(r.latencies)-1))
	return r.latencies[i].Round(time.Microsecond)
}

// hammer sends requests with the bodies body gives from `workers` goroutines for d.
func hammer(c *http.Client, base, method, path string, body func() []byte, workers int, d time.Duration) result {
	var mu sync.Mutex
	var res result
	var wg sync.WaitGroup
	start := time.Now()
	deadline := start.Add(d)
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var lat []time.Duration
			failed := 0
			for time.Now().Before(deadline) {
				t := time.Now()
				status, err := send(c, base, method, path, body())
				lat = append(lat, time.Since(t))
				if err != nil || status != http.StatusOK {
					failed++
					if errors.Is(err, context.Canceled) {
						break
					}
				}
			}
			mu.Lock()
			res.latencies = append(res.latencies, lat...)
			res.failed += failed
			mu.Unlock()
		}()
	}
	wg.Wait()
	res.elapsed = time.Since(start)
	res.n = len(res.latencies)
	return res
}
