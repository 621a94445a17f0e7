// Retention (DOMAIN 6): the time for leakage to move a node from its stored level by the droop
// budget, t = integral of C(V) / I(V) dV, with both recomputed along the way (composite
// Simpson over 4 intervals; the budget is a small part of the swing, so both vary gently). If the net current reverses before the budget is used (a keeper
// or an opposing leak balances it), the node is held and there is no retention limit.

export interface RetentionResult {
  /** Null when held. */
  seconds: number | null;
  held: boolean;
}

export function retentionTime(startV: number, budgetV: number, direction: -1 | 1, capacitanceAt: (v: number) => number, harmfulCurrentAt: (v: number) => number): RetentionResult {
  const steps = 4;
  const h = budgetV / steps;
  let integral = 0;
  for (let k = 0; k <= steps; k++) {
    const v = startV + direction * k * h;
    const i = harmfulCurrentAt(v);
    if (!(i > 0)) return { seconds: null, held: true };
    const w = k === 0 || k === steps ? 1 : k % 2 === 1 ? 4 : 2;
    integral += (w * capacitanceAt(v)) / i;
  }
  return { seconds: (integral * h) / 3, held: false };
}
