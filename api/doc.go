// Package api is scalematch's HTTP service, version 1: the gin router and
// middleware, the handlers, RFC 9457 problem details (the one place where errors
// become statuses), metrics and the OpenAPI document. The work behind each
// endpoint is internal/app's; the bodies are api/schema's.
package api
