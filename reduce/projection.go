package reduce

// Project derives the G/T at an operating antenna temperature (method.md
// section 4, projection).
func Project(b *Beam, passiveGainDBi, chamberAntennaK, operatingAntennaK float64) *Projection {
	return nil
}
