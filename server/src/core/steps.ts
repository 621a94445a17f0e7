// Long stages are generators that yield now and then, so an editor can run them in slices
// between protocol messages and drop them when a newer edit arrives. `runToEnd` is the plain
// synchronous call the CLI and the tests use.

/** A stage that yields (nothing) at safe points and returns its result. */
export type Steps<T> = Generator<void, T, void>;

/** Elements copied into a circuit between yields. */
export const ITEMS_PER_SLICE = 1500;

/** Entries put on per-net lists (a device listed, a switch grouped) between yields. */
export const LIST_ITEMS_PER_SLICE = 6000;

/**
 * For loops of uneven items (a group classified, a node estimated: one floating node's leakage
 * solve may cost a thousand times another's, and costly ones come in runs, so a count of them
 * held the editor for up to 100 ms on 100k transistors): true once about `budgetMs` of work has
 * passed since it last said so. Reading the clock changes no result; it only decides where the
 * loop yields.
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
