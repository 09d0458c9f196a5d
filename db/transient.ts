// MariaDB's transient refusals: a deadlock (1213) or a lock wait that ran out (1205) roll the
// transaction back and ask for it to be run again. A person's action on a busy alert (the
// worker escalating it at the same moment) is retried a few times instead of failing with a 500;
// the readings writer (db/queries/readings-write.ts) asks the same question before its own retry.
const TRANSIENT = new Set([1213 /* deadlock */, 1205 /* lock wait timeout */]);

export function isTransientDbError(err: unknown): boolean {
  for (let e: unknown = err, depth = 0; e && depth < 4; depth++) {
    const errno = (e as { errno?: unknown }).errno;
    if (typeof errno === "number" && TRANSIENT.has(errno)) return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}

/** Runs `work` (a whole transaction) again after a deadlock or lock-wait timeout, up to `attempts` times. */
export async function retryTransient<T>(work: () => Promise<T>, attempts = 4): Promise<T> {
  for (let i = 1; ; i++) {
    try {
      return await work();
    } catch (err) {
      if (i >= attempts || !isTransientDbError(err)) throw err;
      await new Promise((r) => setTimeout(r, 20 * i + Math.floor(Math.random() * 30)));
    }
  }
}
