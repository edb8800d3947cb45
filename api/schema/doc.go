// Package schema holds the request and response bodies of the scalematch HTTP
// API, version 1: the wire types that the service (api, internal/app) and its Go
// client (api/client) share. It imports no HTTP framework, so that a client
// needs no more than the standard library and the physics packages whose types
// appear in the bodies (facilities, similarity, atmosphere).
package schema
