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
	wake := e.c.gathering && !e.c.gatherWaits()
	e.c.mu.Unlock()
	if wake {
		e.c.signal()
	}
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

// gatherAnnounced waits before a group is taken from the queue, so that the
// group holds more records and one commit serves more callers. It waits while
// announcements outstanding when it started have not all settled, or while the
// queue holds fewer records than were in flight when the last group finished (the
// callers answered by that group are expected back, as a client with several
// requests in flight sends its next one as soon as it is answered); and it stops
// when the queue holds a full group, the Committer is closing, or the gathering
// limit has passed: Config.Gather, and once a group has committed at most the
// mean time of a commit, so that a group that waits in vain at most doubles
// its callers' wait. Records announced while it waits are not waited for: they
// arrive as the group commits and start the next one.
//
// Why the records in flight: when commits take longer than planning (a flush
// to stable storage takes milliseconds on many disks), every caller soon waits
// in the queue. Without a wait, each group takes what queued during the commit
// before it, and n callers settle into two groups of about n/2 taking turns;
// waiting for the callers of the last group to come back makes one group of n.
func (c *Committer[R]) gatherAnnounced() {
	var timer *time.Timer
	c.mu.Lock()
	target := c.settled + int64(c.coming)
	want := min(c.inFlight, c.maxGroup)
	limit := c.gather
	if c.commitTime > 0 {
		limit = min(limit, c.commitTime)
	}
	c.mu.Unlock()
	if limit <= 0 {
		return
	}
	for {
		c.mu.Lock()
		c.gatherTarget, c.gatherWant = target, want
		wait := c.gatherWaits()
		c.gathering = wait
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
			c.mu.Lock()
			c.gathering = false
			c.mu.Unlock()
			return
		}
	}
}

// gatherWaits reports whether a gathering group still waits (c.mu held): for
// the announcements it was told of, until they are settled, or for gatherWant
// records, while the queue holds less than a group and the Committer is open.
func (c *Committer[R]) gatherWaits() bool {
	announced := c.settled < c.gatherTarget && c.coming > 0
	return (announced || len(c.queue) < c.gatherWant) && len(c.queue) < c.maxGroup && !c.closed
}
