// Package facilities describes wind and water tunnels: the facility record and its
// validation (with its balances' rating tables as data), the test media, the
// test-section state reached at given settings, wall corrections, the facility's
// cautions, and the catalog interface that storage engines implement. The balance
// loads, their check against the ratings and the required resolution are
// internal/loads'.
package facilities
