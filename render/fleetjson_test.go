package render

import (
	"bytes"
	"encoding/json"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// WriteFleetJSON writes FleetJSON's bytes, for the fixture fleet and for an
// empty one, and they parse back as JSON (encoding/json) to the fleet.
func TestWriteFleetJSON(t *testing.T) {
	for name, f := range map[string]*reduce.Fleet{
		"fixture":   fixtureFleet(t),
		"empty":     {Units: []reduce.FleetUnit{}, Products: []reduce.ProductFleet{}},
		"nil lists": {},
	} {
		want, err := FleetJSON(f)
		if err != nil {
			t.Fatal(err)
		}
		var got bytes.Buffer
		if err := WriteFleetJSON(&got, f); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got.Bytes(), want) {
			t.Errorf("%s: WriteFleetJSON differs from FleetJSON:\n%s\n---\n%s", name, got.Bytes(), want)
		}
		var back struct {
			Schema int             `json:"schema"`
			Units  []fleetUnitWire `json:"units"`
		}
		if err := json.Unmarshal(got.Bytes(), &back); err != nil || len(back.Units) != len(f.Units) || back.Schema != 2 {
			t.Errorf("%s: %v, %d units schema %d", name, err, len(back.Units), back.Schema)
		}
	}
	if WriteFleetJSON(&bytes.Buffer{}, nil) == nil {
		t.Error("a nil fleet was written")
	}
}
