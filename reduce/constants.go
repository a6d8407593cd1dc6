// Package reduce is the physics of gtpack: it turns the typed values that
// ingest read from an archive into range loss, gain, G/T, uncertainty
// budgets and verdicts (method.md sections 2 to 10).
//
// It is pure computation: it opens no file, reads no clock and keeps no
// state between calls. It never refuses to work on a unit because one of
// its inputs is missing; it reduces what can be reduced and lists what
// could not be, as *ingest.Problem values that name the input file.
package reduce

import "math"

// Physical and statistical constants (method.md section 2).
const (
	// BoltzmannJPerK is the Boltzmann constant, exact since the 2019
	// revision of the SI (BIPM, The International System of Units, 9th
	// ed., 2019).
	BoltzmannJPerK = 1.380649e-23
	// ReferenceTemperatureK is T0 of the noise-figure definition.
	ReferenceTemperatureK = 290.0
	// CelsiusOffsetK converts degrees Celsius to kelvin.
	CelsiusOffsetK = 273.15
	// ExpandedCoverageK is the coverage factor of every expanded
	// uncertainty the tool states (about 95 %, JCGM 100:2008).
	ExpandedCoverageK = 2.0
	// MADNormalScale makes the median absolute deviation a consistent
	// estimate of the standard deviation of a normal distribution.
	MADNormalScale = 1.4826
	// DBPerNeperPower is 10/ln(10) = 4.343: the dB change of a power
	// ratio for a small relative change (used by the radiometer term).
	DBPerNeperPower = 10 / math.Ln10
)

// KT0WPerHz is k*T0 in W/Hz, computed from the exact k.
func KT0WPerHz() float64 { return BoltzmannJPerK * ReferenceTemperatureK }

// KT0DBmPerHz is k*T0 in dBm/Hz (about -173.975), computed from the exact
// k rather than the rounded rule of thumb.
func KT0DBmPerHz() float64 { return kt0DBmPerHz }

// ReferenceTemperatureDBK is 10*log10(T0 / 1 K), about 24.624 dB.
func ReferenceTemperatureDBK() float64 { return t0DBK }

// The two logarithms every G/T point needs, computed once.
var (
	kt0DBmPerHz = 10 * math.Log10(KT0WPerHz()*1e3)
	t0DBK       = 10 * math.Log10(ReferenceTemperatureK)
)
