package reduce

import (
	"math"
	"sort"
	"time"

	"gtpack.example/gtpack/ingest"
)

// RangeCheck is one run's check of its range (method.md section 12): the
// range loss at the centre of its reference measurement's grid, the
// pre/post drift there, and what the run used.
type RangeCheck struct {
	Run       string
	Started   time.Time
	Station   string
	Reference string
	// FrequencyHz is where it is read: the grid point nearest the centre
	// of the range-loss grid.
	FrequencyHz float64
	RangeLossDB float64
	// DriftDB is |RL_pre - RL_post| there; nil with one measurement.
	DriftDB *float64
	// DriftToleranceDB is the station's allowed drift (0 when unknown).
	DriftToleranceDB float64
	// Beam and GTdBPerK are the G/T of the beam nearest boresight at the
	// grid point nearest FrequencyHz (what a check unit's chart shows);
	// nil when no beam has a G/T.
	Beam     string
	GTdBPerK *float64
	// ReferenceCertificate, ReferenceCalibrated and ReferenceDue are the
	// reference antenna's (dates, zero when not stated); PastDue says
	// whether the run started after the due date.
	ReferenceCertificate string
	ReferenceCalibrated  time.Time
	ReferenceDue         time.Time
	PastDue              bool
}

// ReferenceHealth is a reference antenna as the runs used it.
type ReferenceHealth struct {
	ID          string
	Certificate string
	Calibrated  time.Time
	Due         time.Time
	// RunsAfterDue are the runs that used it after its due date, in time
	// order.
	RunsAfterDue []RangePoint
}

// ReferencesHealth lists each reference antenna the checks name, by id,
// with the runs that used it past its due date (method.md section 12).
// The dates are those of the latest run's record of it.
func ReferencesHealth(checks map[string][]RangeCheck) []ReferenceHealth {
	byID := map[string]*ReferenceHealth{}
	latest := map[string]time.Time{}
	serials := make([]string, 0, len(checks))
	for s := range checks {
		serials = append(serials, s)
	}
	sort.Strings(serials)
	for _, serial := range serials {
		for _, c := range checks[serial] {
			r := byID[c.Reference]
			if r == nil {
				r = &ReferenceHealth{ID: c.Reference, RunsAfterDue: []RangePoint{}}
				byID[c.Reference] = r
			}
			if !c.Started.Before(latest[c.Reference]) {
				latest[c.Reference] = c.Started
				r.Certificate, r.Calibrated, r.Due = c.ReferenceCertificate, c.ReferenceCalibrated, c.ReferenceDue
			}
			if c.PastDue {
				r.RunsAfterDue = append(r.RunsAfterDue, RangePoint{Serial: serial, Run: c.Run, Started: c.Started, RangeLossDB: c.RangeLossDB, DriftDB: c.DriftDB})
			}
		}
	}
	out := []ReferenceHealth{}
	for _, r := range byID {
		sort.SliceStable(r.RunsAfterDue, func(i, j int) bool { return r.RunsAfterDue[i].Started.Before(r.RunsAfterDue[j].Started) })
		out = append(out, *r)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].ID < out[j].ID })
	return out
}

// RangeCheckOf is the range check of a run from its range loss; nil
// without one.
func RangeCheckOf(run *ingest.Run, st *ingest.Station, ref *ingest.Reference, rl *RangeLoss) *RangeCheck {
	if run == nil || rl == nil || len(rl.FrequencyHz) == 0 || len(rl.RangeLossDB) != len(rl.FrequencyHz) {
		return nil
	}
	f := rl.FrequencyHz
	centre := (f[0] + f[len(f)-1]) / 2
	k := sort.SearchFloat64s(f, centre)
	if k == len(f) || k > 0 && centre-f[k-1] <= f[k]-centre {
		k--
	}
	if !finite(rl.RangeLossDB[k]) {
		return nil
	}
	c := &RangeCheck{Run: run.Dir, Station: run.Station, Reference: run.Reference, FrequencyHz: f[k], RangeLossDB: rl.RangeLossDB[k]}
	c.Started = run.Started.UTC()
	if len(rl.DriftDB) == len(f) && finite(rl.DriftDB[k]) {
		d := rl.DriftDB[k]
		c.DriftDB = &d
	}
	if st != nil {
		c.DriftToleranceDB = st.DriftToleranceDB
	}
	if ref != nil {
		c.ReferenceCertificate, c.ReferenceCalibrated, c.ReferenceDue = ref.Certificate, ref.Calibrated, ref.Due
		c.PastDue = !ref.Due.IsZero() && !run.Started.IsZero() && run.Started.After(ref.Due)
	}
	return c
}

// RangeBaselineRuns is how many runs of a station and reference antenna
// set the control limits of their range check; each later run is judged
// against them (method.md section 12: the usual two phases of control
// charting, common practice).
const RangeBaselineRuns = 20

// RangeChart is the individuals control chart of one station and
// reference antenna's range loss at band centre, run by run.
type RangeChart struct {
	Station     string
	Reference   string
	FrequencyHz float64
	// DriftToleranceDB is the station's allowed pre/post drift, as the
	// latest run recorded it (0 when unknown).
	DriftToleranceDB float64
	// Points are the runs in time order (then by serial and run).
	Points []RangePoint
	// Baseline is the number of first points the limits are set on
	// (at most RangeBaselineRuns).
	Baseline int
	CentreDB float64
	LCLDB    float64
	UCLDB    float64
	// OutOfControl are the indexes of the points beyond the limits; none
	// while the baseline has fewer than MinChartPoints points (TooFew).
	OutOfControl []int
	TooFew       bool
}

// RangePoint is one run on a range chart.
type RangePoint struct {
	Serial      string
	Run         string
	Started     time.Time
	RangeLossDB float64
	DriftDB     *float64
}

// RangeCharts groups the range checks of every run of every unit by
// station and reference antenna and charts each pair: centre line the
// mean of the baseline, limits the centre -/+ 2.66 times its mean moving
// range (method.md section 10). checks maps serial to its runs' checks.
func RangeCharts(checks map[string][]RangeCheck) []RangeChart {
	out := []RangeChart{}
	type key struct{ station, reference string }
	type point struct {
		RangePoint
		hz  float64
		tol float64
	}
	byPair := map[key][]point{}
	for serial, cs := range checks {
		for _, c := range cs {
			k := key{c.Station, c.Reference}
			byPair[k] = append(byPair[k], point{RangePoint{Serial: serial, Run: c.Run, Started: c.Started, RangeLossDB: c.RangeLossDB, DriftDB: c.DriftDB}, c.FrequencyHz, c.DriftToleranceDB})
		}
	}
	keys := make([]key, 0, len(byPair))
	for k := range byPair {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		if keys[i].station != keys[j].station {
			return keys[i].station < keys[j].station
		}
		return keys[i].reference < keys[j].reference
	})
	for _, k := range keys {
		ps := byPair[k]
		sort.Slice(ps, func(i, j int) bool {
			if !ps[i].Started.Equal(ps[j].Started) {
				return ps[i].Started.Before(ps[j].Started)
			}
			if ps[i].Serial != ps[j].Serial {
				return ps[i].Serial < ps[j].Serial
			}
			return ps[i].Run < ps[j].Run
		})
		c := RangeChart{Station: k.station, Reference: k.reference, FrequencyHz: ps[0].hz, DriftToleranceDB: ps[len(ps)-1].tol, OutOfControl: []int{}}
		for _, p := range ps {
			c.Points = append(c.Points, p.RangePoint)
		}
		values := make([]float64, len(ps))
		for i, p := range ps {
			values[i] = p.RangeLossDB
		}
		ch := baselineChart(values)
		c.Baseline, c.CentreDB, c.LCLDB, c.UCLDB, c.OutOfControl, c.TooFew = ch.baseline, ch.centre, ch.lcl, ch.ucl, ch.out, ch.tooFew
		out = append(out, c)
	}
	return out
}

// individuals is an individuals control chart with limits set on a
// baseline (method.md sections 10 and 12).
type individuals struct {
	baseline         int
	centre, lcl, ucl float64
	out              []int
	tooFew           bool
}

// baselineChart sets the centre line on the mean of the first
// RangeBaselineRuns values and the limits at -/+ 2.66 times their mean
// moving range, and lists the values beyond them (none while the baseline
// has fewer than MinChartPoints values).
func baselineChart(values []float64) individuals {
	ch := individuals{baseline: min(len(values), RangeBaselineRuns), out: []int{}}
	if ch.baseline == 0 {
		ch.tooFew = true
		return ch
	}
	base := values[:ch.baseline]
	mean, mr := 0.0, 0.0
	for _, v := range base {
		mean += v
	}
	mean /= float64(len(base))
	for i := 1; i < len(base); i++ {
		mr += math.Abs(base[i] - base[i-1])
	}
	if len(base) > 1 {
		mr /= float64(len(base) - 1)
	}
	ch.centre, ch.lcl, ch.ucl = mean, mean-chartFactor*mr, mean+chartFactor*mr
	ch.tooFew = ch.baseline < MinChartPoints
	if !ch.tooFew {
		for i, v := range values {
			if v > ch.ucl || v < ch.lcl {
				ch.out = append(ch.out, i)
			}
		}
	}
	return ch
}

// CheckUnitChart is a check unit's G/T at band centre run by run, as an
// individuals chart with limits set on its first runs.
type CheckUnitChart struct {
	Serial      string
	Station     string
	Beam        string
	FrequencyHz float64
	// Points are its runs in time order.
	Points       []CheckPoint
	Baseline     int
	CentreDB     float64
	LCLDB        float64
	UCLDB        float64
	OutOfControl []int
	TooFew       bool
}

// CheckPoint is one run of a check unit.
type CheckPoint struct {
	Run      string
	Started  time.Time
	GTdBPerK float64
}

// CheckUnitCharts charts every check unit's runs that have a G/T at band
// centre, by station and serial. checks maps serial to its runs' checks.
func CheckUnitCharts(checks map[string][]RangeCheck) []CheckUnitChart {
	out := []CheckUnitChart{}
	serials := make([]string, 0, len(checks))
	for s := range checks {
		serials = append(serials, s)
	}
	sort.Strings(serials)
	for _, serial := range serials {
		byStation := map[string][]RangeCheck{}
		var stations []string
		for _, c := range checks[serial] {
			if c.GTdBPerK == nil {
				continue
			}
			if _, ok := byStation[c.Station]; !ok {
				stations = append(stations, c.Station)
			}
			byStation[c.Station] = append(byStation[c.Station], c)
		}
		sort.Strings(stations)
		for _, st := range stations {
			cs := byStation[st]
			sort.SliceStable(cs, func(i, j int) bool { return cs[i].Started.Before(cs[j].Started) })
			ch := CheckUnitChart{Serial: serial, Station: st, Beam: cs[len(cs)-1].Beam, FrequencyHz: cs[len(cs)-1].FrequencyHz}
			values := make([]float64, len(cs))
			for i, c := range cs {
				ch.Points = append(ch.Points, CheckPoint{Run: c.Run, Started: c.Started, GTdBPerK: *c.GTdBPerK})
				values[i] = *c.GTdBPerK
			}
			ind := baselineChart(values)
			ch.Baseline, ch.CentreDB, ch.LCLDB, ch.UCLDB, ch.OutOfControl, ch.TooFew = ind.baseline, ind.centre, ind.lcl, ind.ucl, ind.out, ind.tooFew
			out = append(out, ch)
		}
	}
	return out
}
