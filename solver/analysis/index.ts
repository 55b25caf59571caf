export { architecturalConstraints, iec61511MaxSil, iec61511MinimumHft, route1HMaxSil, safeFailureFraction, silClaim, type ClaimInputs } from './constraints.js';
export { evaluateMeasure, measureOfDemand, meetsTarget, type DemandMeasure, type MeasureTarget, type RepeatedSolveOptions } from './evaluate-measure.js';
export { intervalSweep, referenceInterval, tornado, withProofTestInterval, type IntervalSweep, type SweepPoint, type Tornado, type TornadoBar } from './sensitivity.js';
export { spuriousTripRate, votedTripRate } from './spurious-trip.js';
export { subsystemsOf, type Subsystem } from './structure.js';
export { rateUncertainty, DEFAULT_ERROR_FACTOR, type UncertaintyResult } from './uncertainty.js';
export { contributionsOf, type Contribution } from './contributions.js';
