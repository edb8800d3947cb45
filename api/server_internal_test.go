package api

import (
	"context"
	"io"
	"log/slog"
	"net"
	"net/http"
	"testing"
	"time"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"
)

// TestServeDrainsInFlight cancels the serving context while a slow request runs:
// the request must still get its whole answer, new connections must be refused,
// and Serve must return nil.
func TestServeDrainsInFlight(t *testing.T) {
	s, err := New(Config{Registry: prometheus.NewRegistry(), Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		t.Fatal(err)
	}
	started := make(chan struct{})
	s.engine.GET("/test/slow", func(c *gin.Context) {
		close(started)
		time.Sleep(300 * time.Millisecond)
		c.String(http.StatusOK, "finished")
	})
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	base := "http://" + ln.Addr().String()
	ctx, cancel := context.WithCancel(context.Background())
	served := make(chan error, 1)
	go func() { served <- s.Serve(ctx, ln) }()

	type answer struct {
		status int
		body   string
		err    error
	}
	got := make(chan answer, 1)
	go func() {
		resp, err := http.Get(base + "/test/slow")
		if err != nil {
			got <- answer{err: err}
			return
		}
		defer resp.Body.Close()
		b, err := io.ReadAll(resp.Body)
		got <- answer{resp.StatusCode, string(b), err}
	}()
	<-started
	cancel()
	a := <-got
	if a.err != nil || a.status != 200 || a.body != "finished" {
		t.Errorf("in-flight request: %d %q %v, want 200 finished", a.status, a.body, a.err)
	}
	select {
	case err := <-served:
		if err != nil {
			t.Errorf("Serve: %v", err)
		}
	case <-time.After(ShutdownGrace):
		t.Fatal("Serve did not return")
	}
	if _, err := net.DialTimeout("tcp", ln.Addr().String(), time.Second); err == nil {
		t.Error("the listener still accepts connections after shutdown")
	}
}
