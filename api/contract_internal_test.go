package api

import (
	"fmt"
	"net/http"
	"os"
	"sort"
	"strings"
	"sync"
	"testing"

	"scalematch/internal/contract"
)

// Every Server the package's tests build, in this file's package and in
// api_test, answers through contract.Validator: each answer a test receives
// (status, headers, body) is checked against the served OpenAPI 3 document,
// and each request answered 2xx too. A mismatch fails the test binary; TestMain
// lists each distinct one with how often it was seen.

var contractSeen = struct {
	sync.Mutex
	checked  int
	failures map[string]int
}{failures: map[string]int{}}

func init() {
	v, err := contract.New()
	if err != nil {
		panic(err)
	}
	// Routes only the tests add (server_internal_test.go) are not the service's.
	skip := func(r *http.Request) bool { return strings.HasPrefix(r.URL.Path, "/test/") }
	wrapForTest = func(h http.Handler) http.Handler {
		return v.Handler(h, skip, func(res contract.Result) {
			contractSeen.Lock()
			defer contractSeen.Unlock()
			contractSeen.checked++
			if res.Err != nil {
				contractSeen.failures[res.Err.Error()]++
			}
		})
	}
}

func TestMain(m *testing.M) {
	code := m.Run()
	contractSeen.Lock()
	defer contractSeen.Unlock()
	if len(contractSeen.failures) > 0 {
		msgs := make([]string, 0, len(contractSeen.failures))
		for msg := range contractSeen.failures {
			msgs = append(msgs, msg)
		}
		sort.Strings(msgs)
		fmt.Fprintf(os.Stderr, "FAIL: %d distinct answers do not match the OpenAPI 3 document (docs/openapi3.json):\n", len(msgs))
		for _, msg := range msgs {
			fmt.Fprintf(os.Stderr, "--- seen %d times:\n%s\n", contractSeen.failures[msg], msg)
		}
		code = 1
	}
	fmt.Printf("contract: %d answers checked against docs/openapi3.json, %d distinct mismatches\n", contractSeen.checked, len(contractSeen.failures))
	os.Exit(code)
}

// Unvalidated returns the service's handler without the contract check, for
// the benchmarks, which measure the service alone.
func (s *Server) Unvalidated() http.Handler { return s.engine }
