/** A share in percent, as a finding's values keep it (complianceCheck.ts and its parts). */
export function percent(x: number): number {
  return 100 * x;
}
