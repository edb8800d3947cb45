// Package api is scalematch's HTTP service, version 1: the gin router, request and
// response types, unit-aware decoding, RFC 9457 problem details, and the handlers.
package api
