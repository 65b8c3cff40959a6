/**
 * Background work inside each app process: the escalation sweep and the outbox worker. Started
 * once per process by the middleware module; EBB_BACKGROUND=off turns it off (e.g. a web-only
 * instance). Every instance may run it: the work is claimed row by row in MariaDB.
 */
import { runSweep } from './escalations/sweep.ts';
import { deliverDueMail } from './mail/outbox-worker.ts';

let started = false;

function loop(name: string, intervalMs: number, work: () => Promise<unknown>) {
  let running = false;
  const timer = setInterval(async () => {
    if (running) return; // never overlap with ourselves
    running = true;
    try {
      await work();
    } catch (err) {
      console.error(`[background] ${name} failed:`, (err as Error).message);
    } finally {
      running = false;
    }
  }, intervalMs);
  timer.unref();
}

export function startBackgroundWork(): void {
  if (started || process.env.EBB_BACKGROUND === 'off') return;
  started = true;
  loop('escalation sweep', Number(process.env.EBB_SWEEP_INTERVAL_MS ?? 20_000), () => runSweep());
  loop('mail outbox', Number(process.env.EBB_OUTBOX_INTERVAL_MS ?? 2_000), () => deliverDueMail());
}
