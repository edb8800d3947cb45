// Package app is scalematch's application layer, shared by the HTTP service and
// the command line: the Planner validates a request, resolves its facility, runs
// the physics packages (similarity, facilities, atmosphere) and assembles the
// answer, for plans, batches of plans, balance load checks, test-section
// conditions, dimensionless groups, the standard atmosphere and the charts of a
// plan. NewPlanner adds the caches a long-running service keeps (facility
// versions, stored plans). It imports no HTTP framework; its errors are
// *check.Error values, which the service maps to statuses.
package app
