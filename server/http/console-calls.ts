/**
 * Calculations the console runs for an account in this process (request-log replay, the
 * workbench) are charged against the quota as read from the committed month, without the
 * /v1 meter's in-flight count. Running them one at a time per account, across both features,
 * keeps each one's quota check from missing another's units still being charged.
 */
const running = new Map<number, Promise<unknown>>();

/** Runs `fn` after every earlier console-run calculation of the same account has settled. */
export async function oneConsoleCallAtATime<T>(accountId: number, fn: () => Promise<T>): Promise<T> {
  const mine = (running.get(accountId) ?? Promise.resolve()).then(fn, fn);
  const tail = mine.catch(() => undefined);
  running.set(accountId, tail);
  try {
    return await mine;
  } finally {
    if (running.get(accountId) === tail) running.delete(accountId);
  }
}
