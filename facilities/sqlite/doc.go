// Package sqlite keeps the facility catalog and plan records in one embedded SQLite
// file (pure Go, modernc.org/sqlite, no cgo): WAL journal, synchronous=FULL so a
// write is durable when acknowledged, one writer connection, every write one
// BEGIN IMMEDIATE transaction.
package sqlite
