// Package check is the one home of the project's errors and validation reports:
// the domain error (Error, with a Code that the API maps to one HTTP status in one
// place, api/problem.go), the field errors that name a bad input by its JSON path,
// and Fields, which collects the problems of a request or record and returns them
// as one CodeInvalid error. It imports nothing of the project, so that every layer,
// physics packages included, reports bad input the same way.
package check
