package reduce

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
)

// Project derives the G/T at an operating antenna temperature from the
// chamber G/T of a beam (method.md section 4, projection). passiveGainDBi
// is G_p, the antenna gain ahead of the receiver (dBi, taken as flat over
// frequency); chamberAntennaK is the antenna temperature in the chamber
// (T_amb, K); operatingAntennaK is T_A,op (K). Per frequency of b:
//
//	T_sys,ch = G_p / (G/T)_ch   (linear)
//	T_e      = T_sys,ch - T_amb
//	(G/T)_op = G_p / (T_A,op + T_e)
//
// Project returns nil when the inputs are unusable: no beam or no G/T,
// a value that is not finite, T_amb <= 0 or T_A,op <= 0.
//
// When T_e comes out negative at some frequency, the declared G_p is too low
// for the measured G/T (a receiver cannot be colder than nothing), so no
// projected value is given anywhere: the Projection is returned with
// SystemNoiseK and ReceiverNoiseK (so that a reader can see how far off the
// declaration is), OperatingGTdBPerK nil, NegativeReceiverNoiseHz listing
// the frequencies, and the Assumptions saying why. Callers test
// Usable() before using OperatingGTdBPerK.
func Project(b *Beam, passiveGainDBi, chamberAntennaK, operatingAntennaK float64) *Projection {
	if b == nil || len(b.GTdBPerK) == 0 || len(b.FrequencyHz) != len(b.GTdBPerK) {
		return nil
	}
	if !projFinite(passiveGainDBi) || !projFinite(chamberAntennaK) || !projFinite(operatingAntennaK) ||
		chamberAntennaK <= 0 || operatingAntennaK <= 0 {
		return nil
	}
	for _, v := range b.GTdBPerK {
		if !projFinite(v) {
			return nil
		}
	}
	gp := math.Pow(10, passiveGainDBi/10)
	p := &Projection{
		PassiveGainDBi:    passiveGainDBi,
		ChamberAntennaK:   chamberAntennaK,
		OperatingAntennaK: operatingAntennaK,
		SystemNoiseK:      make([]float64, len(b.GTdBPerK)),
		ReceiverNoiseK:    make([]float64, len(b.GTdBPerK)),
	}
	for k, gt := range b.GTdBPerK {
		tsys := gp / math.Pow(10, gt/10)
		p.SystemNoiseK[k] = tsys
		p.ReceiverNoiseK[k] = tsys - chamberAntennaK
		if p.ReceiverNoiseK[k] < 0 {
			p.NegativeReceiverNoiseHz = append(p.NegativeReceiverNoiseHz, b.FrequencyHz[k])
		}
	}
	base := fmt.Sprintf("Derived, not measured. Assumed: the passive gain G_p = %.2f dBi as declared, "+
		"the same at every frequency; in the chamber the antenna sees absorber at T_amb = %.1f K in every "+
		"direction (T_A = T_amb); the receiver noise temperature T_e = G_p/(G/T) - T_amb does not change "+
		"with the antenna temperature (same match and bias in operation as in the chamber).",
		passiveGainDBi, chamberAntennaK)
	if n := len(p.NegativeReceiverNoiseHz); n > 0 {
		p.Assumptions = base + fmt.Sprintf(" Not projected: T_e comes out negative at %d of %d frequencies "+
			"(lowest %.1f K), so the declared G_p is too low for the measured G/T.",
			n, len(b.GTdBPerK), floats.Min(p.ReceiverNoiseK))
		return p
	}
	p.OperatingGTdBPerK = make([]float64, len(b.GTdBPerK))
	for k, te := range p.ReceiverNoiseK {
		p.OperatingGTdBPerK[k] = passiveGainDBi - 10*math.Log10(operatingAntennaK+te)
	}
	p.Assumptions = base + fmt.Sprintf(" Projected to an operating antenna temperature T_A,op = %.1f K: "+
		"(G/T)_op = G_p/(T_A,op + T_e).", operatingAntennaK)
	return p
}

// Usable reports whether the projection carries operating G/T values.
func (p *Projection) Usable() bool {
	return p != nil && len(p.OperatingGTdBPerK) > 0 && len(p.NegativeReceiverNoiseHz) == 0
}

func projFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
