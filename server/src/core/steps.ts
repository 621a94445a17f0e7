// Long stages are generators that yield now and then, so an editor can run them in slices
// between protocol messages and drop them when a newer edit arrives. `runToEnd` is the plain
// synchronous call the CLI and the tests use.

/** A stage that yields (nothing) at safe points and returns its result. */
export type Steps<T> = Generator<void, T, void>;

/** Light items (an element copied, a device listed) a loop handles between yields. */
export const ITEMS_PER_SLICE = 1500;

/**
 * Heavy items (a group classified, a node estimated) between yields. A dynamic cell's group or
 * a floating node's leakage solve costs tens of microseconds, and they come in runs, so a step
 * of 1,500 of them held the editor for up to 100 ms on 100k transistors; at 200 a step stays
 * under about 10 ms there.
 */
export const HEAVY_ITEMS_PER_SLICE = 200;

/**
 * For loops of uneven items (one floating node's leakage solve may cost a thousand times
 * another's): true once about `budgetMs` of work has passed since it last said so. Reading the
 * clock changes no result; it only decides where the loop yields.
 */
export function stepDue(budgetMs = 5): () => boolean {
  let last = performance.now();
  return () => {
    const now = performance.now();
    if (now - last < budgetMs) return false;
    last = now;
    return true;
  };
}

export function runToEnd<T>(steps: Steps<T>): T {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}
