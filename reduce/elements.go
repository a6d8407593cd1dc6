package reduce

import "gtpack.example/gtpack/ingest"

// AnalyseElements analyses an array's element state (method.md section 9).
func AnalyseElements(els []ingest.Element, toleranceDeg *float64) *ElementState {
	return nil
}
