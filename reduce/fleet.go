package reduce

// FleetSchema is the version of the fleet.json layout. Schema 2: the units
// carry one entry per limit name (FleetUnitLimit) instead of every
// LimitResult of every beam.
const FleetSchema = 2

// UnitSummary is the part of a unit's result the fleet statistics and
// results.csv need. FleetBuilder takes them one at a time and keeps only a
// FleetUnit and the resampled boresight trace of each.
type UnitSummary struct {
	Serial  string        `json:"serial"`
	Product string        `json:"product"`
	Started string        `json:"started"`
	Verdict string        `json:"verdict"`
	Limits  []LimitResult `json:"limits"`
	// Boresight is the G/T of the beam closest to boresight, for the
	// fleet's per-frequency band; nil when the unit has none.
	Boresight *BoresightTrace `json:"boresight,omitempty"`
	// Stale says why the unit's files in the site are those of an earlier
	// build (its acceptance run was refused); empty when they are current.
	Stale string `json:"stale,omitempty"`
	// NoReport is set when the site holds no report for the unit (its
	// only runs were refused).
	NoReport bool `json:"no_report,omitempty"`
	// Runs is how many runs the unit had; FirstVerdict is its first run's
	// verdict (a retested unit's first verdict differs from the last).
	Runs         int    `json:"runs,omitempty"`
	FirstVerdict string `json:"first_verdict,omitempty"`
	// RangeChecks are the range checks of the unit's runs, oldest first
	// (range health: fleet.json's stations).
	RangeChecks []RangeCheck `json:"range_checks,omitempty"`
	// CheckUnit: see Unit.CheckUnit.
	CheckUnit bool `json:"check_unit,omitempty"`
	// IssueState, Revision and ReportNumber are the report's issue state
	// (see Issue).
	IssueState   string `json:"issue_state,omitempty"`
	Revision     int    `json:"revision,omitempty"`
	ReportNumber string `json:"report_number,omitempty"`
}

// BoresightTrace is one unit's G/T against frequency at boresight.
type BoresightTrace struct {
	Beam        string    `json:"beam"`
	FrequencyHz []float64 `json:"frequency_hz"`
	GTdBPerK    []float64 `json:"gt_db_per_k"`
}

// Fleet is what fleet.json holds: statistics per product over the
// acceptance runs.
type Fleet struct {
	Schema   int            `json:"schema"`
	Units    []FleetUnit    `json:"units"` // sorted by serial
	Products []ProductFleet `json:"products"`
	// Stations are the range charts of each station and reference antenna
	// (range health), References each reference antenna's dates and the
	// runs that used it past its due date.
	Stations   []RangeChart      `json:"stations"`
	References []ReferenceHealth `json:"references"`
	// CheckUnits are the check units' G/T at band centre over time.
	CheckUnits []CheckUnitChart `json:"check_units"`
	// Notices say what the pages do not show as they should (units a
	// build could not write); empty when all is well.
	Notices []string `json:"notices,omitempty"`
}

// FleetUnit is the fleet's view of one unit: what the overview and the
// fleet workbook show of it, one entry per limit name rather than one per
// limit and beam.
type FleetUnit struct {
	Serial   string           `json:"serial"`
	Product  string           `json:"product"`
	Started  string           `json:"started"`
	Verdict  string           `json:"verdict"`
	Limits   []FleetUnitLimit `json:"limits"`              // in the order of the names' first results
	Stale    string           `json:"stale,omitempty"`     // see UnitSummary.Stale
	NoReport bool             `json:"no_report,omitempty"` // see UnitSummary.NoReport
	// Runs is how many runs the unit had and FirstVerdict its first run's
	// verdict (contract, "Site layout": fleet.json's units).
	Runs         int    `json:"runs"`
	FirstVerdict string `json:"first_verdict"`
	// CheckUnit marks a check unit: it is in no product's statistics.
	CheckUnit bool `json:"check_unit,omitempty"`
	// IssueState, Revision and ReportNumber: see UnitSummary.
	IssueState   string `json:"issue_state,omitempty"`
	Revision     int    `json:"revision,omitempty"`
	ReportNumber string `json:"report_number,omitempty"`
}

// FleetUnitLimit is a unit's result for one limit name over all the beams
// the limit applies to.
type FleetUnitLimit struct {
	Name string `json:"name"`
	// Beam is where WorstMarginDB occurs (the first such beam on a tie);
	// empty when no beam has a finite margin.
	Beam string `json:"beam"`
	// WorstMarginDB is the smallest finite WorstMarginDB of the limit's
	// results, whatever their verdicts; NaN (null) when none is finite.
	WorstMarginDB float64 `json:"worst_margin_db"`
	// Verdict is the worst verdict of the limit's results (WorseVerdict).
	Verdict string `json:"verdict"`
}

// ProductFleet is the statistics of one product.
type ProductFleet struct {
	Product       string         `json:"product"`
	Units         int            `json:"units"`
	VerdictCounts map[string]int `json:"verdict_counts"`
	Limits        []LimitStats   `json:"limits"`
	Band          *GoldenBand    `json:"band,omitempty"`
	Watch         []WatchEntry   `json:"watch"`
	// FirstPassYield is the share of units whose first run passed
	// (conditional pass included), FinalYield the share whose acceptance
	// run did, over the units judged (method.md section 10).
	FirstPassYield float64 `json:"first_pass_yield"`
	FinalYield     float64 `json:"final_yield"`
	// Months has one entry per calendar month of acceptance runs, oldest
	// first (contract, "Site layout").
	Months []MonthYield `json:"months"`
}

// MonthYield is one calendar month of a product's acceptance runs.
type MonthYield struct {
	Month         string         `json:"month"` // YYYY-MM, of the acceptance run's start (UTC)
	Units         int            `json:"units"`
	VerdictCounts map[string]int `json:"verdict_counts"`
	// FirstPassYield and FinalYield as ProductFleet's, over the month's
	// judged units; NaN (null) when it has none.
	FirstPassYield float64 `json:"first_pass_yield"`
	FinalYield     float64 `json:"final_yield"`
	Retested       int     `json:"retested"` // units with more than one run
}

// LimitStats is the fleet's view of one limit: per unit its worst margin
// over the beams the limit applies to.
type LimitStats struct {
	Name         string  `json:"name"`
	Units        int     `json:"units"`
	Passed       int     `json:"passed"`
	Yield        float64 `json:"yield"`
	MeanMarginDB float64 `json:"mean_margin_db"`
	StdMarginDB  float64 `json:"std_margin_db"`
	// Cpk is (mean - 0)/(3*sigma) on margins; 0 with fewer than two units.
	Cpk float64 `json:"cpk"`
	// Indicative marks statistics from fewer than MinCapabilityUnits
	// units: a capability index from few units says little (method.md
	// section 10).
	Indicative bool         `json:"indicative,omitempty"`
	Chart      ControlChart `json:"control_chart"`
	Outliers   []Outlier    `json:"outliers"`
}

// ControlChart is an individuals chart of worst margins in test order.
type ControlChart struct {
	Serials         []string  `json:"serials"`
	Started         []string  `json:"started"`
	ValuesDB        []float64 `json:"values_db"`
	CentreDB        float64   `json:"centre_db"`
	UpperDB         float64   `json:"upper_db"`
	LowerDB         float64   `json:"lower_db"`
	MeanMovingRange float64   `json:"mean_moving_range_db"`
	// Beyond lists the indexes of points outside the limits; empty while
	// the chart has fewer than MinChartPoints points (TooFew).
	Beyond []int `json:"beyond"`
	TooFew bool  `json:"too_few,omitempty"`
}

// Outlier is a unit whose worst margin has a modified z-score above 3.5.
type Outlier struct {
	Serial    string  `json:"serial"`
	MarginDB  float64 `json:"margin_db"`
	ModifiedZ float64 `json:"modified_z"`
}

// GoldenBand is the per-frequency median and spread of boresight G/T
// across the units of a product.
type GoldenBand struct {
	FrequencyHz []float64 `json:"frequency_hz"`
	MedianDB    []float64 `json:"median_db_per_k"`
	// LowDB and HighDB are median -/+ 3 * 1.4826 * MAD.
	LowDB  []float64 `json:"low_db_per_k"`
	HighDB []float64 `json:"high_db_per_k"`
	Units  int       `json:"units"`
	// SmoothingPoints is the width of the centred moving average applied
	// to every unit's trace, and to the band's half-width, before the band
	// and the watch list are made: point-to-point measurement scatter
	// would otherwise put every unit on the watch list somewhere.
	SmoothingPoints int `json:"smoothing_points"`
}

// WatchEntry is a passing unit whose boresight G/T leaves the band.
type WatchEntry struct {
	Serial        string    `json:"serial"`
	FrequenciesHz []float64 `json:"frequencies_hz"`
	// RangesHz groups FrequenciesHz into runs of neighbouring grid points,
	// [first, last] each.
	RangesHz [][2]float64 `json:"ranges_hz"`
	// SpanHz is [first, last] of FrequenciesHz; Points their number;
	// WorstExcursionDB the largest distance outside the band, signed
	// (below the band negative), and WorstAtHz where it is.
	SpanHz           [2]float64 `json:"span_hz"`
	Points           int        `json:"points"`
	WorstExcursionDB float64    `json:"worst_excursion_db"`
	WorstAtHz        float64    `json:"worst_at_hz"`
}
