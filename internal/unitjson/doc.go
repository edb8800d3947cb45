// Package unitjson decodes the JSON bodies of scalematch's requests strictly and
// with units: Decode fills a struct as encoding/json would, but accepts a string
// with a unit ("2.5 bar", "35000 ft", "1:16") wherever a field's `unit:"…"` tag
// names an SI unit, refuses unknown keys, and reports every bad field at once by
// its JSON path as one *facilities.Error, which the service answers as a 400.
//
// Why not encoding/json alone: it stops at the first error, names no JSON path
// for most of them, and cannot take a unit string in a float field without a
// custom type on every field. Decode reads the body into the tree encoding/json's
// Decoder would build (its own small reader for the common case, encoding/json
// for anything unusual) and walks that tree alongside the destination by
// reflection.
package unitjson
