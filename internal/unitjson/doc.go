// Package unitjson decodes the JSON bodies of scalematch's requests strictly and
// with units: Decode fills a struct as encoding/json would, but accepts a string
// with a unit ("2.5 bar", "35000 ft", "1:16") wherever a field's `unit:"…"` tag
// names an SI unit, refuses unknown keys, and reports every bad field at once by
// its JSON path as one *check.Error, which the service answers as a 400.
//
// Its reason to exist is what it accepts and reports, not speed: encoding/json
// stops at the first error, names no JSON path for most of them, and cannot take
// a unit string in a float field without a custom type on every field. Measured
// (BenchmarkDecode, one run, go test -bench 'BenchmarkDecode$' -count 6, medians
// on a shared 2-core machine under load, ±30 %): the 2.7 kB plan request of the
// load test with every value SI takes 300 µs and 160 allocations through Decode
// against 229 µs and 26 allocations through encoding/json with
// DisallowUnknownFields, so Decode costs about 1.3 times encoding/json; the same
// request with unit strings 287 µs. Decode reads the body into the tree
// encoding/json's Decoder would build (its own small reader for the common case,
// encoding/json for anything unusual) and walks that tree alongside the
// destination by reflection.
package unitjson
