/**
 * Work that must not delay an answer (a reset e-mail: answering at once, whether the
 * address exists or not, keeps the timing the same). Failures are logged, never lost
 * silently; tests await backgroundIdle() before reading the mailbox.
 */
import { log } from "../log";
const pending = new Set<Promise<void>>();

export function inBackground(what: string, task: () => Promise<unknown>) {
  const p: Promise<void> = task()
    .then(() => undefined)
    .catch((e) => log.error({ err: e }, `${what} failed`))
    .finally(() => pending.delete(p));
  pending.add(p);
}

export async function backgroundIdle() {
  while (pending.size) await Promise.allSettled([...pending]);
}
