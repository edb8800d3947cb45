// Package facilities describes wind and water tunnels: the facility record and its
// validation, the test media, the test-section state reached at given settings, wall
// corrections, balances and their load-limit check, and the catalog interface that
// storage engines implement.
package facilities
