// Package campaign plans a test campaign: one full-scale article over a matrix of
// flight conditions in one or more facilities, with one model scale shared by
// every facility (or one per facility, or a choice among existing models), each
// condition assigned to the facility that serves it best, the runs ordered to cut
// pressure and temperature changes, and the tunnel hours (docs/campaigns.md).
// Run is deterministic: the same request against the same facilities gives the
// same Result.
package campaign
