/**
 * Background work inside each app process: the escalation sweep and the outbox worker. Started
 * once per process by the middleware module; EBB_BACKGROUND=off turns it off (e.g. a web-only
 * instance). Every instance may run it: the work is claimed row by row in MariaDB.
 */
import { runSweep } from './escalations/sweep.ts';
import { deliverDueMail } from './mail/outbox-worker.ts';
import { onMailCommitted } from './mail/wake.ts';

let started = false;

/** Runs `work` every `intervalMs`, and at once when kicked; never two runs at a time (a kick during a run runs once more after it). */
export function loop(name: string, intervalMs: number, work: () => Promise<unknown>): () => void {
  let running = false;
  let again = false;
  const run = async () => {
    if (running) {
      again = true;
      return;
    } // never overlap with ourselves
    running = true;
    try {
      do {
        again = false;
        try {
          await work();
        } catch (err) {
          console.error(`[background] ${name} failed:`, (err as Error).message);
        }
      } while (again);
    } finally {
      running = false;
    }
  };
  const timer = setInterval(run, intervalMs);
  timer.unref();
  return () => void run();
}

export function startBackgroundWork(): void {
  if (started || process.env.EBB_BACKGROUND === 'off') return;
  started = true;
  loop('escalation sweep', Number(process.env.EBB_SWEEP_INTERVAL_MS ?? 20_000), () => runSweep());
  // The poll is the backstop (mail written by other instances, retries); a commit that wrote mail in
  // this process wakes the worker at once.
  const kickOutbox = loop('mail outbox', Number(process.env.EBB_OUTBOX_INTERVAL_MS ?? 2_000), () => deliverDueMail());
  onMailCommitted(kickOutbox);
}
