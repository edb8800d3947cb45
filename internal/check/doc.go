// Package check is where validation reports: Fields collects the problems of a
// request or record by JSON path and returns them as one CodeInvalid error.
package check
