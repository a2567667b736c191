/**
 * To be removed: analyses/analyzeTransfer.ts still imports normalQuantile from here (analyses/ is being
 * reworked on another branch). Everything else imports estimate/statistics/distributions.ts, where the one
 * implementation lives.
 */
export { normalQuantile } from "./distributions.js";
