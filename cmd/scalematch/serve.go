package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"os"
	"os/signal"
	"strconv"
	"strings"
	"syscall"

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
	// tokens maps write tokens to the names recorded for their changes.
	tokens map[string]facilities.Actor
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
comma-separated, each "name:token" or a bare token. The name is recorded with every
change it makes; a bare token is recorded as "token-1", "token-2", ... by its place
among the bare ones, never as itself. A token that contains ':' needs a name. With
no tokens, catalog changes are refused (403); reads and planning stay open.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := flagsFromEnv(cmd.Flags(), os.LookupEnv); err != nil {
				return err
			}
			var err error
			if o.tokens, err = parseWriteTokens(os.Getenv(envWriteTokens)); err != nil {
				return err
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

// parseWriteTokens reads SCALEMATCH_WRITE_TOKENS: comma-separated "name:token" pairs
// or bare tokens. Errors never quote a token.
func parseWriteTokens(s string) (map[string]facilities.Actor, error) {
	tokens := map[string]facilities.Actor{}
	bare := 0
	for i, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			continue
		}
		name, token, named := strings.Cut(item, ":")
		name, token = strings.TrimSpace(name), strings.TrimSpace(token)
		if !named {
			bare++
			name, token = "token-"+strconv.Itoa(bare), item
		}
		if name == "" || token == "" {
			return nil, fmt.Errorf("%s: entry %d: want name:token or a bare token", envWriteTokens, i+1)
		}
		if strings.ContainsFunc(token, func(r rune) bool { return r <= ' ' || r == 0x7f }) {
			return nil, fmt.Errorf("%s: entry %d (%s): a token cannot contain spaces or control characters", envWriteTokens, i+1, name)
		}
		if _, dup := tokens[token]; dup {
			return nil, fmt.Errorf("%s: entry %d (%s) repeats an earlier token", envWriteTokens, i+1, name)
		}
		tokens[token] = facilities.Actor(name)
	}
	return tokens, nil
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

// serve opens the store, seeds it on first start, serves until ctx is done, drains
// the requests in flight and closes the store. It logs JSON lines to logw.
func serve(ctx context.Context, o serveOptions, logw io.Writer) (err error) {
	log := slog.New(slog.NewJSONHandler(logw, nil))
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
	seeded, err := facilities.SeedDemo(ctx, store, !o.noDemo)
	if err != nil {
		return err
	}
	log.Info("store open", "store", where, "demo_seeded", seeded, "write_tokens", len(o.tokens))
	srv, err := api.New(api.Config{
		Catalog:     store,
		WriteTokens: o.tokens,
		Registry:    prometheus.NewRegistry(),
		Logger:      log,
	})
	if err != nil {
		return err
	}
	pg, err := pages.New(srv, log)
	if err != nil {
		return err
	}
	pg.Register(srv)
	var lc net.ListenConfig
	ln, err := lc.Listen(ctx, "tcp", o.addr)
	if err != nil {
		return err
	}
	if o.ready != nil {
		o.ready(ln.Addr())
	}
	return srv.Serve(ctx, ln)
}
