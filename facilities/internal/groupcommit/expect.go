package groupcommit

import (
	"context"
	"sync/atomic"
	"time"
)

// expectKey is the context key of an Expect announcement.
type expectKey struct{}

// expectation is one announced record: settled once it is submitted or withdrawn.
type expectation[R any] struct {
	c       *Committer[R]
	settled atomic.Bool
}

// Expect announces that a Submit call with the returned context (or one derived
// from it) is likely to follow soon. A group that starts while records are
// announced waits for them to be queued, at most Config.Gather, so that they
// share its transaction and flush instead of each waiting for one of its own;
// the same idea as PostgreSQL's commit_delay with commit_siblings (PostgreSQL
// documentation, "WAL Configuration"). Durability is unchanged: every call is
// still answered only after its own group has committed.
//
// The returned function withdraws the announcement; call it when the work is
// finished, submitted or not (after Submit it does nothing, and so does a second
// call). An announcement that is never withdrawn nor followed by Submit delays
// each group by Config.Gather.
func (c *Committer[R]) Expect(ctx context.Context) (context.Context, func()) {
	e := &expectation[R]{c: c}
	c.mu.Lock()
	c.coming++
	c.mu.Unlock()
	return context.WithValue(ctx, expectKey{}, e), e.withdraw
}

// withdraw settles an announcement that Submit has not settled.
func (e *expectation[R]) withdraw() {
	if !e.settled.CompareAndSwap(false, true) {
		return
	}
	e.c.mu.Lock()
	e.c.coming--
	e.c.settled++
	e.c.mu.Unlock()
	e.c.signal()
}

// Announced returns how many announcements are outstanding (neither submitted
// nor withdrawn) and how many have settled since New.
func (c *Committer[R]) Announced() (outstanding int, settled int64) {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.coming, c.settled
}

// SetGather changes Config.Gather, the longest a group waits for announced
// records, from the next group on; zero turns the wait off.
func (c *Committer[R]) SetGather(d time.Duration) {
	c.mu.Lock()
	c.gather = d
	c.mu.Unlock()
}

// gatherAnnounced waits, at most the gathering limit, until as many
// announcements have settled as were outstanding when it started (or the queue
// holds a full group, or the Committer is closing). Records announced while it
// waits are not waited for: they arrive as the group commits and start the next
// one.
func (c *Committer[R]) gatherAnnounced() {
	var timer *time.Timer
	c.mu.Lock()
	target := c.settled + int64(c.coming)
	limit := c.gather
	c.mu.Unlock()
	if limit <= 0 {
		return
	}
	for {
		c.mu.Lock()
		wait := c.settled < target && c.coming > 0 && len(c.queue) < c.maxGroup && !c.closed
		c.mu.Unlock()
		if !wait {
			return
		}
		if timer == nil {
			timer = time.NewTimer(limit)
			defer timer.Stop()
		}
		select {
		case <-c.arrived:
		case <-timer.C:
			return
		}
	}
}
