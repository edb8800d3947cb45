package deploy_test

import (
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"go.yaml.in/yaml/v3"
)

// compose is the part of docker-compose.yml the checks read.
type compose struct {
	Services map[string]struct {
		Image       string            `yaml:"image"`
		Build       any               `yaml:"build"`
		Environment map[string]string `yaml:"environment"`
		Deploy      struct {
			Replicas int `yaml:"replicas"`
		} `yaml:"deploy"`
		Volumes     []string       `yaml:"volumes"`
		Healthcheck map[string]any `yaml:"healthcheck"`
		DependsOn   any            `yaml:"depends_on"`
	} `yaml:"services"`
}

func read(t *testing.T, name string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", name))
	require.NoError(t, err)
	return string(b)
}

// TestCompose parses docker-compose.yml (no container engine runs here) and checks
// the shared-store layout: PostgreSQL with a health check, two replicas given the
// database URL and write tokens from the environment, a proxy with its config.
func TestCompose(t *testing.T) {
	t.Parallel()
	var c compose
	dec := yaml.NewDecoder(strings.NewReader(read(t, "docker-compose.yml")))
	require.NoError(t, dec.Decode(&c), "docker-compose.yml")
	for _, name := range []string{"db", "app", "proxy"} {
		require.Contains(t, c.Services, name, "services")
	}
	assert.NotNil(t, c.Services["db"].Healthcheck, "db needs a health check")
	assert.NotNil(t, c.Services["proxy"].Healthcheck, "proxy needs a health check")
	app := c.Services["app"]
	assert.Equal(t, 2, app.Deploy.Replicas, "app replicas")
	assert.NotNil(t, app.Build, "app is built from the Dockerfile")
	assert.True(t, strings.HasPrefix(app.Environment["SCALEMATCH_WRITE_TOKENS"], "${SCALEMATCH_WRITE_TOKENS"),
		"SCALEMATCH_WRITE_TOKENS = %q, want it taken from the environment", app.Environment["SCALEMATCH_WRITE_TOKENS"])
	dbURL := app.Environment["SCALEMATCH_DATABASE_URL"]
	assert.True(t, strings.HasPrefix(dbURL, "postgres://"), "SCALEMATCH_DATABASE_URL = %q, want PostgreSQL", dbURL)
	assert.Contains(t, dbURL, "@db:5432/", "SCALEMATCH_DATABASE_URL names the db service")
	assert.True(t, slices.ContainsFunc(c.Services["proxy"].Volumes, func(v string) bool {
		src := strings.SplitN(v, ":", 2)[0]
		_, err := os.Stat(filepath.Join("..", src))
		return err == nil && strings.HasSuffix(src, "nginx.conf")
	}), "proxy mounts an existing deploy/nginx.conf")
}

func TestDockerfile(t *testing.T) {
	t.Parallel()
	d := read(t, "Dockerfile")
	tests := []struct {
		name, pattern string
	}{
		{"golang 1.26 builder", `(?m)^FROM golang:1\.26\S* AS build`},
		{"static build", `CGO_ENABLED=0`},
		{"distroless or scratch final stage", `(?m)^FROM (gcr\.io/distroless/static\S*|scratch)\s*$`},
		{"non-root user", `(?m)^USER [1-9][0-9]*`},
		{"port", `(?m)^EXPOSE 8080$`},
		{"serve on all interfaces", `"serve", "--addr", "0\.0\.0\.0:8080"`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			assert.Regexp(t, regexp.MustCompile(tt.pattern), d, "Dockerfile")
		})
	}
}

// TestNginxBraces is a cheap syntax check of the proxy config: balanced braces,
// every directive line ended, and the upstream the server proxies to defined.
func TestNginxBraces(t *testing.T) {
	t.Parallel()
	conf := read(t, "deploy/nginx.conf")
	depth := 0
	for i, line := range strings.Split(conf, "\n") {
		line = strings.TrimSpace(strings.SplitN(line, "#", 2)[0])
		if line == "" {
			continue
		}
		depth += strings.Count(line, "{") - strings.Count(line, "}")
		require.GreaterOrEqual(t, depth, 0, "line %d closes a block never opened", i+1)
		assert.True(t, strings.HasSuffix(line, "{") || strings.HasSuffix(line, "}") || strings.HasSuffix(line, ";"),
			"line %d is not ended by ';': %q", i+1, line)
	}
	assert.Zero(t, depth, "blocks left open")
	assert.Contains(t, conf, "upstream scalematch", "the proxy's upstream")
	assert.Contains(t, conf, "proxy_pass http://scalematch;", "the proxy passes to the scalematch upstream")
}
