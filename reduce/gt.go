package reduce

import "math"

// Noise trace quantities a run can declare (archive-format.md, run.yaml).
const (
	NoiseDensityDBmPerHz   = "noise-density-dbm-hz"
	NoiseRelativeKT0       = "noise-relative-kt0-db"
	SystemNoiseFigureDB    = "system-noise-figure-db"
	ruleSimple             = "simple"
	ruleGuarded            = "guarded"
	distributionNormal     = "normal"
	distributionRect       = "rectangular"
	distributionUShaped    = "u-shaped"
	distributionTriangular = "triangular"
)

// NoiseRelativeFromDensityDB converts an output noise density in dBm/Hz to
// dB above k*T0: N_rel = N - 10*log10(k*T0 / 1 mW/Hz) (method.md section 4).
func NoiseRelativeFromDensityDB(densityDBmPerHz float64) float64 {
	return densityDBmPerHz - KT0DBmPerHz()
}

// GTNoiseDensity is G/T in dB/K in the noise-density form (method.md
// section 4): G/T = G_aut - N_rel - 10*log10(T0), with gainDBi the AUT's
// total realized gain and noiseRelativeKT0DB its output noise density in
// dB above k*T0.
func GTNoiseDensity(gainDBi, noiseRelativeKT0DB float64) float64 {
	return gainDBi - noiseRelativeKT0DB - ReferenceTemperatureDBK()
}

// GTSystemNoiseFigure is G/T in dB/K in the system-noise-figure form
// (method.md section 4): G/T = RL - NF_sys - 10*log10(T0), with
// rangeLossDB the range loss and systemNFdB the noise figure of the path
// from the range input to the AUT output.
func GTSystemNoiseFigure(rangeLossDB, systemNFdB float64) float64 {
	return rangeLossDB - systemNFdB - ReferenceTemperatureDBK()
}

// YFactorTe is the equivalent noise temperature T_e in kelvin of a
// receiver measured with loads at tHotK and tColdK and the power ratio
// y = P_hot/P_cold (linear): T_e = (T_hot - y*T_cold)/(y - 1). It returns
// NaN when y = 1 (the two loads were not told apart).
func YFactorTe(tHotK, tColdK, y float64) float64 {
	if y == 1 {
		return math.NaN()
	}
	return (tHotK - y*tColdK) / (y - 1)
}

// NoiseFigureDB is the noise figure 10*log10(1 + T_e/T0) of a receiver of
// equivalent noise temperature teK.
func NoiseFigureDB(teK float64) float64 {
	return 10 * math.Log10(1+teK/ReferenceTemperatureK)
}

// NoiseTemperatureK is the equivalent noise temperature T0*(F - 1) of a
// noise figure in dB.
func NoiseTemperatureK(noiseFigureDB float64) float64 {
	return ReferenceTemperatureK * (math.Pow(10, noiseFigureDB/10) - 1)
}

// AmbientHalfWidthDB is the half-width |10*log10(T_amb/T0)| of the
// ambient-temperature term (method.md section 4): the most by which G/T
// measured with the antenna seeing T_amb can differ from G/T at
// T_A = 290 K without more data.
func AmbientHalfWidthDB(ambientK float64) float64 {
	return math.Abs(10 * math.Log10(ambientK/ReferenceTemperatureK))
}
