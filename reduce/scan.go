package reduce

import "gtpack.example/gtpack/ingest"

// ScanBehaviour returns the scan behaviour of a unit's beams (method.md
// section 8), or nil when there is no boresight beam or no scanned beam.
func ScanBehaviour(beams []Beam, limits []ingest.Limit) *Scan {
	return nil
}
