package reduce

import "time"

// UnitSummary is the part of a unit's result the fleet statistics and
// results.csv need. FleetBuilder takes them one at a time and keeps only a
// FleetUnit and the resampled boresight trace of each.
type UnitSummary struct {
	Serial  string
	Product string
	Started time.Time
	Verdict Verdict
	Limits  []LimitResult
	// Boresight is the G/T of the beam closest to boresight, for the
	// fleet's per-frequency band; nil when the unit has none.
	Boresight *BoresightTrace
	// Stale says why the unit's files in the site are those of an earlier
	// build (its acceptance run was refused); empty when they are current.
	Stale string
	// NoReport is set when the site holds no report for the unit (its
	// only runs were refused).
	NoReport bool
	// Runs is how many runs the unit had; FirstVerdict is its first run's
	// verdict (a retested unit's first verdict differs from the last).
	Runs         int
	FirstVerdict Verdict
	// RangeChecks are the range checks of the unit's runs, oldest first
	// (range health: fleet.json's stations).
	RangeChecks []RangeCheck
	// CheckUnit: see Unit.CheckUnit.
	CheckUnit bool
	// IssueState, Revision and ReportNumber are the report's issue state
	// (see Issue).
	IssueState   IssueState
	Revision     int
	ReportNumber string
}

// BoresightTrace is one unit's G/T against frequency at boresight.
type BoresightTrace struct {
	Beam        string
	FrequencyHz []float64
	GTdBPerK    []float64
}

// Fleet is what fleet.json holds: statistics per product over the
// acceptance runs.
type Fleet struct {
	Units    []FleetUnit // sorted by serial
	Products []ProductFleet
	// Stations are the range charts of each station and reference antenna
	// (range health), References each reference antenna's dates and the
	// runs that used it past its due date.
	Stations   []RangeChart
	References []ReferenceHealth
	// CheckUnits are the check units' G/T at band centre over time.
	CheckUnits []CheckUnitChart
	// Notices say what the pages do not show as they should (units a
	// build could not write); empty when all is well.
	Notices []string
}

// FleetUnit is the fleet's view of one unit: what the overview and the
// fleet workbook show of it, one entry per limit name rather than one per
// limit and beam.
type FleetUnit struct {
	Serial   string
	Product  string
	Started  time.Time
	Verdict  Verdict
	Limits   []FleetUnitLimit // in the order of the names' first results
	Stale    string           // see UnitSummary.Stale
	NoReport bool             // see UnitSummary.NoReport
	// Runs is how many runs the unit had and FirstVerdict its first run's
	// verdict (contract, "Site layout": fleet.json's units).
	Runs         int
	FirstVerdict Verdict
	// CheckUnit marks a check unit: it is in no product's statistics.
	CheckUnit bool
	// IssueState, Revision and ReportNumber: see UnitSummary.
	IssueState   IssueState
	Revision     int
	ReportNumber string
}

// FleetUnitLimit is a unit's result for one limit name over all the beams
// the limit applies to.
type FleetUnitLimit struct {
	Name string
	// Beam is where WorstMarginDB occurs (the first such beam on a tie);
	// empty when no beam has a finite margin.
	Beam string
	// WorstMarginDB is the smallest finite WorstMarginDB of the limit's
	// results, whatever their verdicts; NaN when none is finite.
	WorstMarginDB float64
	// Verdict is the worst verdict of the limit's results (WorseVerdict).
	Verdict Verdict
}

// ProductFleet is the statistics of one product.
type ProductFleet struct {
	Product       string
	Units         int
	VerdictCounts map[Verdict]int
	Limits        []LimitStats
	Band          *GoldenBand
	Watch         []WatchEntry
	// FirstPassYield is the share of units whose first run passed
	// (conditional pass included), FinalYield the share whose acceptance
	// run did, over the units judged (method.md section 10).
	FirstPassYield float64
	FinalYield     float64
	// Months has one entry per calendar month of acceptance runs, oldest
	// first (contract, "Site layout").
	Months []MonthYield
}

// MonthYield is one calendar month of a product's acceptance runs.
type MonthYield struct {
	Month         string // YYYY-MM, of the acceptance run's start (UTC)
	Units         int
	VerdictCounts map[Verdict]int
	// FirstPassYield and FinalYield as ProductFleet's, over the month's
	// judged units; NaN when it has none.
	FirstPassYield float64
	FinalYield     float64
	Retested       int // units with more than one run
}

// LimitStats is the fleet's view of one limit: per unit its worst margin
// over the beams the limit applies to.
type LimitStats struct {
	Name         string
	Units        int
	Passed       int
	Yield        float64
	MeanMarginDB float64
	StdMarginDB  float64
	// Cpk is (mean - 0)/(3*sigma) on margins; 0 with fewer than two units.
	Cpk float64
	// Indicative marks statistics from fewer than MinCapabilityUnits
	// units: a capability index from few units says little (method.md
	// section 10).
	Indicative bool
	Chart      ControlChart
	Outliers   []Outlier
}

// ControlChart is an individuals chart of worst margins in test order.
type ControlChart struct {
	Serials         []string
	Started         []time.Time
	ValuesDB        []float64
	CentreDB        float64
	UpperDB         float64
	LowerDB         float64
	MeanMovingRange float64
	// Beyond lists the indexes of points outside the limits; empty while
	// the chart has fewer than MinChartPoints points (TooFew).
	Beyond []int
	TooFew bool
}

// Outlier is a unit whose worst margin has a modified z-score above 3.5.
type Outlier struct {
	Serial    string
	MarginDB  float64
	ModifiedZ float64
}

// GoldenBand is the per-frequency median and spread of boresight G/T
// across the units of a product.
type GoldenBand struct {
	FrequencyHz []float64
	MedianDB    []float64
	// LowDB and HighDB are median -/+ 3 * 1.4826 * MAD.
	LowDB  []float64
	HighDB []float64
	Units  int
	// SmoothingPoints is the width of the centred moving average applied
	// to every unit's trace, and to the band's half-width, before the band
	// and the watch list are made: point-to-point measurement scatter
	// would otherwise put every unit on the watch list somewhere.
	SmoothingPoints int
}

// WatchEntry is a passing unit whose boresight G/T leaves the band.
type WatchEntry struct {
	Serial        string
	FrequenciesHz []float64
	// RangesHz groups FrequenciesHz into runs of neighbouring grid points,
	// [first, last] each.
	RangesHz [][2]float64
	// SpanHz is [first, last] of FrequenciesHz; Points their number;
	// WorstExcursionDB the largest distance outside the band, signed
	// (below the band negative), and WorstAtHz where it is.
	SpanHz           [2]float64
	Points           int
	WorstExcursionDB float64
	WorstAtHz        float64
}
