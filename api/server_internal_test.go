package api

import (
	"io"
	"net"
	"net/http"
	"strings"
	"testing"
	"time"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/testfixture"
)

// TestServeDrainsInFlight cancels the serving context while a slow request runs:
// the request must still get its whole answer, new connections must be refused,
// and Serve must return nil.
func TestServeDrainsInFlight(t *testing.T) {
	s, err := New(Config{Registry: prometheus.NewRegistry(), Logger: testfixture.Quiet()})
	require.NoError(t, err)
	started := make(chan struct{})
	s.engine.GET("/test/slow", func(c *gin.Context) {
		close(started)
		time.Sleep(300 * time.Millisecond)
		c.String(http.StatusOK, "finished")
	})
	base, cancel, served := testfixture.ServeLoopback(t, s.Serve)

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
	if assert.NoError(t, a.err, "in-flight request") {
		assert.Equal(t, http.StatusOK, a.status, "in-flight request")
		assert.Equal(t, "finished", a.body, "in-flight request")
	}
	select {
	case err := <-served:
		assert.NoError(t, err, "Serve")
	case <-time.After(ShutdownGrace):
		require.FailNow(t, "Serve did not return")
	}
	_, err = net.DialTimeout("tcp", strings.TrimPrefix(base, "http://"), time.Second)
	assert.Error(t, err, "the listener still accepts connections after shutdown")
}
