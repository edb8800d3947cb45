package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"os"
	"os/signal"
	"path"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/prometheus/client_golang/prometheus"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/facilities/postgres"
	"scalematch/facilities/sqlite"
	"scalematch/internal/pages"
)

// Environment variables read by serve besides the SCALEMATCH_<FLAG> of each flag.
const (
	envDatabaseURL = "SCALEMATCH_DATABASE_URL"
	envWriteTokens = "SCALEMATCH_WRITE_TOKENS"
)

// serveOptions are the serve command's settings.
type serveOptions struct {
	addr   string
	data   string
	noDemo bool
	// databaseURL, when it starts with postgres:// or postgresql://, selects
	// PostgreSQL; empty: SQLite under data.
	databaseURL string
	// tokens maps write tokens to the names recorded for their changes; scopes
	// maps a token to the facility-id pattern it is limited to.
	tokens map[string]facilities.Actor
	scopes map[string]string
	// drain is how long a shutdown reports unready before it stops accepting.
	drain time.Duration
	// metricsAddr, when set, serves /metrics there instead of on addr.
	metricsAddr string
	// jobs configures the background worker of large campaigns.
	jobs api.JobsConfig
	// ready, when set (by tests), is called with the listening address.
	ready func(net.Addr)
}

func newServeCmd() *cobra.Command {
	var o serveOptions
	cmd := &cobra.Command{
		Use:   "serve",
		Short: "Run the HTTP service",
		Long: `Run the HTTP service until SIGTERM or SIGINT, then finish the requests in
flight, close the store and exit. Besides the JSON API under /v1 it serves HTML
pages: / (the facilities), /facilities/{id}, /plans/{id} (a printable plan
report) and /check (a load-check form).

Every flag may also be set by SCALEMATCH_<FLAG> (SCALEMATCH_ADDR, SCALEMATCH_DATA,
SCALEMATCH_NO_DEMO); a flag on the command line wins.

The catalog and plan records live in an SQLite file under --data, seeded with the
demo facilities on first start (unless --no-demo), or in PostgreSQL when
SCALEMATCH_DATABASE_URL is a postgres:// URL.

SCALEMATCH_WRITE_TOKENS lists the bearer tokens allowed to change the catalog,
comma-separated, each "name:token", "name:token:pattern" or a bare token. The name
is recorded with every change it makes; a bare token is recorded as "token-1",
"token-2", ... by its place among the bare ones, never as itself. A pattern
(path.Match syntax, e.g. "tsw-*") limits the token to the facility ids it matches;
other ids are refused (403). A token cannot contain ':'. With no tokens, catalog
changes are refused (403); reads and planning stay open.

Campaigns too large to answer at once are stored as jobs and planned in the
background by a worker in each replica (--job-slots at a time, none with
--no-jobs). A replica holds a job under a lease it renews; a job whose replica
died is taken over by another, or by this one when it restarts, once --job-lease
has passed since its last renewal, and planned again from the start.

On SIGTERM the service reports itself unready (/readyz 503) for --drain while it
still serves, then stops accepting connections and finishes the requests in
flight (at most 30 s).`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := flagsFromEnv(cmd.Flags(), os.LookupEnv); err != nil {
				return err
			}
			var err error
			if o.tokens, o.scopes, err = parseWriteTokens(os.Getenv(envWriteTokens)); err != nil {
				return err
			}
			if o.jobs.Lease < time.Second || o.jobs.Slots < 1 || o.jobs.Slots > 64 {
				return fmt.Errorf("--job-lease %s and --job-slots %d: want a lease of at least 1s and 1 to 64 slots", o.jobs.Lease, o.jobs.Slots)
			}
			o.databaseURL = os.Getenv(envDatabaseURL)
			ctx, stop := signal.NotifyContext(cmd.Context(), os.Interrupt, syscall.SIGTERM)
			defer stop()
			return serve(ctx, o, cmd.ErrOrStderr())
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.addr, "addr", "127.0.0.1:8080", "address to listen on, host:port")
	f.StringVar(&o.data, "data", "./scalematch-data", "directory of the SQLite catalog (unused with SCALEMATCH_DATABASE_URL)")
	f.BoolVar(&o.noDemo, "no-demo", false, "do not seed a new catalog with the demo facilities")
	f.DurationVar(&o.drain, "drain", 5*time.Second, "on SIGTERM, how long to report unready (/readyz 503) while still serving before new connections are refused")
	f.StringVar(&o.metricsAddr, "metrics-addr", "", "serve /metrics on this address (host:port) instead of on --addr")
	f.DurationVar(&o.jobs.Lease, "job-lease", 30*time.Second, "how long a replica's claim on a campaign job holds without renewal: a job whose replica died is taken over after this long")
	f.IntVar(&o.jobs.Slots, "job-slots", 1, "how many campaign jobs this replica plans at once")
	f.BoolVar(&o.jobs.Off, "no-jobs", false, "plan no campaign jobs here (other replicas do); large campaigns are still accepted and stored")
	return cmd
}

// envName is the environment variable of a flag: "no-demo" → SCALEMATCH_NO_DEMO.
func envName(flag string) string {
	return "SCALEMATCH_" + strings.ToUpper(strings.ReplaceAll(flag, "-", "_"))
}

// flagsFromEnv sets every flag not given on the command line from its
// SCALEMATCH_<FLAG> variable, when that is set.
func flagsFromEnv(fs *pflag.FlagSet, lookup func(string) (string, bool)) error {
	var errs []error
	fs.VisitAll(func(f *pflag.Flag) {
		if f.Changed {
			return
		}
		v, ok := lookup(envName(f.Name))
		if !ok {
			return
		}
		if err := fs.Set(f.Name, v); err != nil {
			errs = append(errs, fmt.Errorf("%s=%q: %v", envName(f.Name), v, err))
		}
	})
	return errors.Join(errs...)
}

// parseWriteTokens reads SCALEMATCH_WRITE_TOKENS: comma-separated "name:token" or
// "name:token:pattern" entries, or bare tokens. It returns the names by token and
// the facility-id patterns by token. Errors never quote a token.
func parseWriteTokens(s string) (map[string]facilities.Actor, map[string]string, error) {
	tokens := map[string]facilities.Actor{}
	scopes := map[string]string{}
	bare := 0
	for i, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			continue
		}
		parts := strings.SplitN(item, ":", 3)
		for j := range parts {
			parts[j] = strings.TrimSpace(parts[j])
		}
		var name, token, pattern string
		switch len(parts) {
		case 1:
			bare++
			name, token = "token-"+strconv.Itoa(bare), parts[0]
		case 2:
			name, token = parts[0], parts[1]
		default:
			name, token, pattern = parts[0], parts[1], parts[2]
			if _, err := path.Match(pattern, ""); err != nil || pattern == "" {
				return nil, nil, fmt.Errorf("%s: entry %d (%s): the facility-id pattern does not parse (want e.g. tsw-*)", envWriteTokens, i+1, name)
			}
		}
		if name == "" || token == "" {
			return nil, nil, fmt.Errorf("%s: entry %d: want name:token, name:token:pattern or a bare token", envWriteTokens, i+1)
		}
		if strings.ContainsFunc(token, func(r rune) bool { return r <= ' ' || r == 0x7f }) {
			return nil, nil, fmt.Errorf("%s: entry %d (%s): a token cannot contain spaces or control characters", envWriteTokens, i+1, name)
		}
		if _, dup := tokens[token]; dup {
			return nil, nil, fmt.Errorf("%s: entry %d (%s) repeats an earlier token", envWriteTokens, i+1, name)
		}
		tokens[token] = facilities.Actor(name)
		if pattern != "" {
			scopes[token] = pattern
		}
	}
	return tokens, scopes, nil
}

// openStore opens PostgreSQL when url is a postgres URL, else the SQLite file under
// dir.
func openStore(ctx context.Context, url, dir string) (facilities.Catalog, string, error) {
	switch {
	case strings.HasPrefix(url, "postgres://"), strings.HasPrefix(url, "postgresql://"):
		db, err := postgres.Open(ctx, url)
		return db, "postgres", err
	case url != "":
		return nil, "", fmt.Errorf("%s: want a postgres:// URL", envDatabaseURL)
	}
	db, err := sqlite.Open(ctx, sqlite.Path(dir))
	return db, "sqlite " + sqlite.Path(dir), err
}

// serve binds its addresses, opens the store, seeds it on first start, serves
// until ctx is done, drains the requests in flight and closes the store. It logs
// JSON lines to logw. The addresses are bound first, so that a port in use or a
// bad address fails before anything is created on disk.
func serve(ctx context.Context, o serveOptions, logw io.Writer) (err error) {
	log := slog.New(slog.NewJSONHandler(logw, nil))
	var lc net.ListenConfig
	ln, err := lc.Listen(ctx, "tcp", o.addr)
	if err != nil {
		return err
	}
	defer ln.Close()
	var mln net.Listener
	if o.metricsAddr != "" {
		if mln, err = lc.Listen(ctx, "tcp", o.metricsAddr); err != nil {
			return fmt.Errorf("--metrics-addr: %w", err)
		}
		defer mln.Close()
	}
	store, where, err := openStore(ctx, o.databaseURL, o.data)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := store.Close(); cerr != nil {
			err = errors.Join(err, fmt.Errorf("closing the store: %w", cerr))
			return
		}
		log.Info("store closed")
	}()
	if qc, ok := store.(interface {
		QuickCheck(context.Context) error
	}); ok {
		t := time.Now()
		if err := qc.QuickCheck(ctx); err != nil {
			return fmt.Errorf("%s: %w (run scalematch check for the full check)", where, err)
		}
		log.Info("store quick check passed", "duration_ms", float64(time.Since(t).Microseconds())/1000)
	}
	seeded, err := facilities.SeedDemo(ctx, store, !o.noDemo)
	if err != nil {
		return err
	}
	log.Info("store open", "store", where, "demo_seeded", seeded, "write_tokens", len(o.tokens), "scoped_tokens", len(o.scopes))
	srv, err := api.New(api.Config{
		Catalog:          store,
		WriteTokens:      o.tokens,
		WriteScopes:      o.scopes,
		Registry:         prometheus.NewRegistry(),
		Logger:           log,
		DrainDelay:       o.drain,
		MetricsElsewhere: mln != nil,
		Jobs:             o.jobs,
	})
	if err != nil {
		return err
	}
	pg, err := pages.New(srv, log)
	if err != nil {
		return err
	}
	pg.Register(srv)
	if mln != nil {
		ms := &http.Server{Handler: srv.MetricsHandler(), ReadHeaderTimeout: 5 * time.Second}
		go ms.Serve(mln)
		defer ms.Close()
		log.Info("metrics listening", "addr", mln.Addr().String())
	}
	if o.ready != nil {
		o.ready(ln.Addr())
	}
	return srv.Serve(ctx, ln)
}
