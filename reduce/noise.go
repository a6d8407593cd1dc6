package reduce

import (
	"math"
	"sort"
)

// NoSmoothing is the smoothing gtpack applies to noise traces: none. A
// centred moving average would lower the point-to-point scatter but also
// blur real ripple of the receiver over frequency, which a reader of the
// report wants to see; the trace is therefore used as measured, and
// NoiseStatistics.SmoothingPoints says so (1).
const NoSmoothing = 1

// RobustScatterDB is the point-to-point standard deviation of a trace in
// dB (method.md section 5): sigma = 1.4826 * MAD(first differences) /
// sqrt(2). First differences remove any slow trend over frequency; the
// median absolute deviation ignores the odd spike. It returns 0 for fewer
// than three values (fewer than two differences say nothing about scatter).
func RobustScatterDB(values []float64) float64 {
	if len(values) < 3 {
		return 0
	}
	d := make([]float64, len(values)-1)
	for i := range d {
		d[i] = values[i+1] - values[i]
	}
	return MADNormalScale * madInPlace(d) / math.Sqrt2
}

// SmoothedScatterDB is the scatter of a trace after a centred moving
// average over n points: the raw scatter divided by sqrt(n) (method.md
// section 5). n < 1 counts as 1.
func SmoothedScatterDB(rawScatterDB float64, n int) float64 {
	if n < 1 {
		n = 1
	}
	return rawScatterDB / math.Sqrt(float64(n))
}

// RadiometerDB is the standard deviation in dB of a noise-power estimate
// with noise bandwidth bandwidthHz and integration time integrationS
// (Dicke's radiometer equation, method.md section 5): 4.343/sqrt(B*tau).
// It returns 0 when B*tau is not positive (not given).
func RadiometerDB(bandwidthHz, integrationS float64) float64 {
	bt := bandwidthHz * integrationS
	if !(bt > 0) || math.IsInf(bt, 0) {
		return 0
	}
	return DBPerNeperPower / math.Sqrt(bt)
}

// medianInPlace returns the median of s (the mean of the two middle
// values for an even count), sorting s; 0 for no values.
func medianInPlace(s []float64) float64 {
	n := len(s)
	if n == 0 {
		return 0
	}
	sort.Float64s(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// madInPlace returns median(|s - median(s)|), overwriting s.
func madInPlace(s []float64) float64 {
	m := medianInPlace(s)
	for i, v := range s {
		s[i] = math.Abs(v - m)
	}
	return medianInPlace(s)
}
