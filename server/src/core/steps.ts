// Long stages are generators that yield now and then, so an editor can run them in slices
// between protocol messages and drop them when a newer edit arrives. `runToEnd` is the plain
// synchronous call the CLI and the tests use.

/** A stage that yields (nothing) at safe points and returns its result. */
export type Steps<T> = Generator<void, T, void>;

/** Items a loop handles between yields: small enough for ~10 ms slices on 100k transistors. */
export const ITEMS_PER_SLICE = 1500;

export function runToEnd<T>(steps: Steps<T>): T {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}
