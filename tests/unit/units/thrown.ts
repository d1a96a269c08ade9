/** Runs f, expects it to throw an error of class `type`, and returns that error for its fields. */
export function thrown<E extends Error>(type: new (...args: never[]) => E, f: () => unknown): E {
  try {
    f();
  } catch (e) {
    if (e instanceof type) return e;
    throw new Error(`expected ${type.name}, got ${String(e)}`);
  }
  throw new Error(`expected ${type.name}, nothing was thrown`);
}
