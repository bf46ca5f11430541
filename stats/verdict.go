package stats

import "math"

// Verdict is the state of one depth of a scan, one word each, used alike in
// code, JSON ("verdict"), tables and the human report.
type Verdict string

// The verdict states. Under RuleBoth a depth is VerdictSpread when R's
// interval lies within [1−eps, 1+eps] and the mean Porter–Thomas distance is
// within PTMargin of the Haar baseline; otherwise the first failing check
// of Criteria.Judge names it. Under RuleCollision only the upper end of R's interval is
// tested (R ≤ 1+eps, the one-sided anti-concentration property).
const (
	// VerdictSpread: every criterion of the rule holds.
	VerdictSpread Verdict = "spread"
	// VerdictShallow: R may exceed 1+eps (the upper end of its interval
	// does): outputs still more concentrated than Haar, or not yet shown
	// otherwise.
	VerdictShallow Verdict = "shallow"
	// VerdictFlat: R may lie below 1−eps (the lower end of its interval
	// does): outputs flatter than Haar-random ones, as stabilizer circuits'
	// uniform supports are.
	VerdictFlat Verdict = "flat"
	// VerdictDistorted: R's interval is not wholly above 1+eps but the
	// Porter–Thomas distance is more than PTMargin above the Haar baseline:
	// the shape of the output distribution is not Porter–Thomas, whatever
	// the second moment says.
	VerdictDistorted Verdict = "distorted"
	// VerdictUnresolved: there is no interval (too few instances) or it
	// reaches below 1−eps and above 1+eps at once.
	VerdictUnresolved Verdict = "unresolved"
)

// Rule selects the criteria of a verdict; its values are the spellings of
// the --rule flag and of the "rule" metadata and JSON key.
type Rule string

// The rules.
const (
	// RuleBoth: R two-sided within [1−eps, 1+eps] and the Porter–Thomas
	// distance within PTMargin of the Haar baseline (the default).
	RuleBoth Rule = "both"
	// RuleCollision: the anti-concentration depth alone, upper end of R's
	// interval ≤ 1+eps.
	RuleCollision Rule = "collision"
)

// DefaultPTMargin is the default PTMargin: the mean Porter–Thomas distance
// may exceed the Haar baseline by at most 0.01, a sup-distance of one
// percentage point between the CDF of the output probabilities and the
// Haar CDF beyond what D finite values give.
const DefaultPTMargin = 0.01

// Criteria are the parameters of a verdict. Eps must lie in [0, 1) and
// Confidence in (0, 1); PTMargin must be non-negative; Rule "" means RuleBoth.
type Criteria struct {
	Eps, Confidence, PTMargin float64
	Rule                      Rule
}

// DefaultCriteria returns the criteria of the defaults of scan: RuleBoth at
// eps with confidence conf and DefaultPTMargin.
func DefaultCriteria(eps, conf float64) Criteria {
	return Criteria{Eps: eps, Confidence: conf, PTMargin: DefaultPTMargin, Rule: RuleBoth}
}

// Check panics unless the criteria are valid (see Criteria).
func (c Criteria) Check() {
	checkConf(c.Confidence)
	if !(c.Eps >= 0 && c.Eps < 1) {
		panic("stats: eps must lie in [0, 1)")
	}
	if !(c.PTMargin >= 0) || math.IsInf(c.PTMargin, 1) {
		panic("stats: Porter–Thomas margin must be non-negative and finite")
	}
	switch c.Rule {
	case "", RuleBoth, RuleCollision:
	default:
		panic("stats: unknown verdict rule " + string(c.Rule))
	}
}

// Judge returns the verdict of one depth from the interval [lower, upper]
// of R (ok false when there is none), the mean Porter–Thomas distance pt
// and the Haar baseline of the same dimension. The checks run in this order:
// no interval → unresolved; the whole interval above 1+eps → shallow; under
// RuleBoth, pt > baseline + PTMargin → distorted (a distribution that is not
// Porter–Thomas is named so whatever R does), an interval reaching past
// both ends of the band → unresolved; upper > 1+eps → shallow; under
// RuleBoth, lower < 1−eps → flat; otherwise spread. A NaN pt fails the
// Porter–Thomas check. It panics if c is invalid.
func (c Criteria) Judge(lower, upper float64, ok bool, pt, baseline float64) Verdict {
	c.Check()
	hi, lo := 1+c.Eps, 1-c.Eps
	both := c.Rule != RuleCollision
	switch {
	case !ok || math.IsNaN(lower) || math.IsNaN(upper):
		return VerdictUnresolved
	case lower > hi:
		return VerdictShallow
	case both && !(pt <= baseline+c.PTMargin):
		return VerdictDistorted
	case both && lower < lo && upper > hi:
		return VerdictUnresolved
	case upper > hi:
		return VerdictShallow
	case both && lower < lo:
		return VerdictFlat
	}
	return VerdictSpread
}

// RWithin reports criterion (a): R's interval [lower, upper] exists (ok)
// and lies within [1−eps, 1+eps] (under RuleCollision: upper ≤ 1+eps).
func (c Criteria) RWithin(lower, upper float64, ok bool) bool {
	if !ok {
		return false
	}
	if c.Rule == RuleCollision {
		return upper <= 1+c.Eps
	}
	return lower >= 1-c.Eps && upper <= 1+c.Eps
}

// PTNear reports criterion (b): the mean Porter–Thomas distance pt is at
// most baseline + PTMargin.
func (c Criteria) PTNear(pt, baseline float64) bool { return pt <= baseline+c.PTMargin }

// RecommendedDepth returns the first depth from which every later requested
// depth is spread, and false when the last depth is not. Asking every later
// depth to pass, each at its own level, is an intersection–union test, so
// the claim "spread from here on" keeps the stated level however many
// depths were requested (Berger 1982, Technometrics 24, 295): the depths
// are not each a separate chance. depths must be strictly ascending. It
// panics if the lengths differ or the depths are not ascending.
func RecommendedDepth(depths []int, verdicts []Verdict) (depth int, ok bool) {
	if len(depths) != len(verdicts) {
		panic("stats: depths and verdicts differ in length")
	}
	checkAscending(depths)
	for i := len(verdicts) - 1; i >= 0 && verdicts[i] == VerdictSpread; i-- {
		depth, ok = depths[i], true
	}
	return depth, ok
}

// checkAscending panics unless depths are strictly ascending.
func checkAscending(depths []int) {
	for i := 1; i < len(depths); i++ {
		if depths[i] <= depths[i-1] {
			panic("stats: depths not strictly ascending")
		}
	}
}
