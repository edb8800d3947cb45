package facilities

import (
	"bytes"
	_ "embed"
	"encoding/json"
	"fmt"
)

// demoJSON holds the demo facilities of the invented demo world (docs: scenario).
//
//go:embed demo.json
var demoJSON []byte

// Demo returns a fresh copy of the embedded demo facilities, ordered as listed.
// They are invented: none describes a real facility.
func Demo() []Facility {
	var v struct {
		Facilities []Facility `json:"facilities"`
	}
	dec := json.NewDecoder(bytes.NewReader(demoJSON))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&v); err != nil {
		// The file is embedded at build time and covered by TestDemo; a failure here
		// is a build defect, not user input.
		panic(fmt.Sprintf("facilities: embedded demo.json: %v", err))
	}
	return v.Facilities
}

// DemoFacility returns the demo facility with the given id.
func DemoFacility(id string) (Facility, bool) {
	for _, f := range Demo() {
		if f.ID == id {
			return f, true
		}
	}
	return Facility{}, false
}
