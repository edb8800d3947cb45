package groupcommit

import (
	"context"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestGatherWokenOnlyWhenItsWaitEnds checks that a group gathering its records
// is signalled by the record that ends its wait, not by each record before it
// (each signal is a goroutine switch of the gathering caller). A regression
// value: before, every queued record signalled.
func TestGatherWokenOnlyWhenItsWaitEnds(t *testing.T) {
	t.Parallel()
	c := New(Config[int]{Commit: func([]int) error { return nil }, Gather: time.Minute})
	// A group is committing and gathering: it waits for two records (those in
	// flight when the group before it finished) and for no announcement.
	c.mu.Lock()
	c.running = true
	c.gathering, c.gatherWant, c.gatherTarget = true, 2, c.settled
	c.mu.Unlock()
	outcomes := make(chan Outcome, 2)
	submit := func(rec int) {
		_, o, _ := c.Submit(context.Background(), rec)
		outcomes <- o
	}
	go submit(1)
	require.Eventually(t, func() bool { return c.Queued() == 1 }, 10*time.Second, time.Millisecond)
	assert.Empty(t, c.arrived, "one record of the two waited for: the gathering group is not woken")
	go submit(2)
	require.Eventually(t, func() bool { return c.Queued() == 2 }, 10*time.Second, time.Millisecond)
	assert.Len(t, c.arrived, 1, "the second record ends the wait: the gathering group is woken")

	// Nothing commits here: Close answers both records as not stored.
	c.mu.Lock()
	c.running = false
	c.mu.Unlock()
	c.Close()
	for range 2 {
		assert.Equal(t, Closed, <-outcomes)
	}
}
