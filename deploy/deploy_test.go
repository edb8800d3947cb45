package deploy_test

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

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
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestCompose parses docker-compose.yml (no container engine runs here) and checks
// the shared-store layout: PostgreSQL with a health check, two replicas given the
// database URL and write tokens from the environment, a proxy with its config.
func TestCompose(t *testing.T) {
	var c compose
	dec := yaml.NewDecoder(strings.NewReader(read(t, "docker-compose.yml")))
	if err := dec.Decode(&c); err != nil {
		t.Fatalf("docker-compose.yml: %v", err)
	}
	for _, name := range []string{"db", "app", "proxy"} {
		if _, ok := c.Services[name]; !ok {
			t.Fatalf("service %q missing", name)
		}
	}
	if c.Services["db"].Healthcheck == nil || c.Services["proxy"].Healthcheck == nil {
		t.Error("db and proxy need health checks")
	}
	app := c.Services["app"]
	if app.Deploy.Replicas != 2 {
		t.Errorf("app replicas = %d, want 2", app.Deploy.Replicas)
	}
	if app.Build == nil {
		t.Error("app is not built from the Dockerfile")
	}
	if v := app.Environment["SCALEMATCH_WRITE_TOKENS"]; !strings.HasPrefix(v, "${SCALEMATCH_WRITE_TOKENS") {
		t.Errorf("SCALEMATCH_WRITE_TOKENS = %q, want it taken from the environment", v)
	}
	if !strings.HasPrefix(app.Environment["SCALEMATCH_DATABASE_URL"], "postgres://") ||
		!strings.Contains(app.Environment["SCALEMATCH_DATABASE_URL"], "@db:5432/") {
		t.Errorf("SCALEMATCH_DATABASE_URL = %q, want the db service", app.Environment["SCALEMATCH_DATABASE_URL"])
	}
	found := false
	for _, v := range c.Services["proxy"].Volumes {
		src := strings.SplitN(v, ":", 2)[0]
		if _, err := os.Stat(filepath.Join("..", src)); err == nil && strings.HasSuffix(src, "nginx.conf") {
			found = true
		}
	}
	if !found {
		t.Error("proxy does not mount an existing deploy/nginx.conf")
	}
}

func TestDockerfile(t *testing.T) {
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
			if !regexp.MustCompile(tt.pattern).MatchString(d) {
				t.Errorf("Dockerfile lacks %s (%s)", tt.name, tt.pattern)
			}
		})
	}
}

// TestNginxBraces is a cheap syntax check of the proxy config: balanced braces,
// every directive line ended, and the upstream the server proxies to defined.
func TestNginxBraces(t *testing.T) {
	conf := read(t, "deploy/nginx.conf")
	depth := 0
	for i, line := range strings.Split(conf, "\n") {
		line = strings.TrimSpace(strings.SplitN(line, "#", 2)[0])
		if line == "" {
			continue
		}
		depth += strings.Count(line, "{") - strings.Count(line, "}")
		if depth < 0 {
			t.Fatalf("line %d closes a block never opened", i+1)
		}
		if !strings.HasSuffix(line, "{") && !strings.HasSuffix(line, "}") && !strings.HasSuffix(line, ";") {
			t.Errorf("line %d is not ended by ';': %q", i+1, line)
		}
	}
	if depth != 0 {
		t.Errorf("%d blocks left open", depth)
	}
	if !strings.Contains(conf, "upstream scalematch") || !strings.Contains(conf, "proxy_pass http://scalematch;") {
		t.Error("the proxy does not pass to the scalematch upstream")
	}
}
