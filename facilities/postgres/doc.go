// Package postgres keeps the facility catalog and plan records in PostgreSQL for
// shared deployments: several stateless service replicas over one database, writes
// in transactions with row locks so no update is lost, and embedded forward-only
// migrations applied at start under an advisory lock.
package postgres
