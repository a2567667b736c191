/** Cautions printed wherever a result can feed a decision about people or equipment. */
export const SHAKER_CAUTION =
  "Displacement and velocity figures are estimates from the profile alone (peak-to-peak taken as 6 x RMS, a ±3 sigma excursion: common practice). " +
  "Check them, and the force the test needs, against the shaker's and fixture's own rated limits with margin; the governing test standard, the lab's procedure and a qualified test engineer decide.";

export const VERDICT_CAUTION =
  "This verdict compares a measured spectrum with the stated profile and tolerances only. It does not replace the governing test standard, " +
  "the lab's approved procedure or the judgement of a qualified engineer; a verdict that feeds a safety decision needs their review and signature.";

export const STROKE_CAUTION =
  "The stroke figure is an estimate from the acceleration spectrum alone (peak-to-peak taken as 6 x RMS displacement, a ±3 sigma excursion: common practice; " +
  "the lowest frequency integrated dominates it). The exciter's and fixture's rated limits, with margin, the governing test standard and the lab's procedure decide whether a test may run.";

export const RESPONSE_CAUTION =
  "Single-degree-of-freedom estimates: a real structure has several modes, nonlinear damping and stress concentrations. Use these figures to compare environments, " +
  "not as a structural qualification; the governing standard and a qualified engineer decide.";

export const DERIVE_CAUTION =
  "A derived profile rests on a linear, lightly damped single-degree-of-freedom model with Gaussian, stationary response and on Miner's rule, and on field recordings that represent the service life. " +
  "Time compression raises the test's levels above the field's: check the extreme-response ratio, the item's and fixture's limits and any nonlinearity. " +
  "The governing test standard's tailoring process and a qualified engineer decide whether and how the profile is used.";

/** The caution of a transfer record: it speaks of the figures this page shows (|H|, Q, resonances, coherence). */
export const TRANSFER_CAUTION =
  "The frequency responses, resonance frequencies and Q values on this page describe this fixture, item and mounting at the levels of this recording only: a response can shift with level, preload and temperature. " +
  "Where they feed a decision about a fixture's or an item's fitness (a fixture survey, a notch, a test level) check them against the fixture's and exciter's rated limits with margin; the governing test standard, the lab's procedure and a qualified test engineer decide.";
