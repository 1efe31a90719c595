// Scratch arrays reused from one series to the next: the engine's hot loops ask for a buffer of at
// least n entries by name instead of allocating per series. Every entry a caller reads it has
// written first in the same call; nothing from a workspace may be kept in a result (copy it out).
// One workspace per thread (module state; each worker thread has its own module instance).

type Typed = Float64Array | Int32Array;

export class Workspace {
  private readonly arrays = new Map<string, Typed>();

  /** A Float64Array of at least n entries (contents unspecified). */
  f64(name: string, n: number): Float64Array {
    return this.get(name, n, Float64Array);
  }

  /** An Int32Array of at least n entries (contents unspecified). */
  i32(name: string, n: number): Int32Array {
    return this.get(name, n, Int32Array);
  }

  private get<T extends Typed>(name: string, n: number, make: new (length: number) => T): T {
    let a = this.arrays.get(name) as T | undefined;
    if (!a || a.length < n) {
      a = new make(grow(a?.length ?? 0, n));
      this.arrays.set(name, a);
    }
    return a;
  }
}

function grow(have: number, need: number): number {
  return Math.max(need, Math.min(2 * have, need + (1 << 20)));
}

/** The engine's workspace for the current thread. */
export const scratch = new Workspace();
