/**
 * The HL7 v2 MLLP listener as its own process, started by start.sh and test-env.sh (EBB_MLLP=off
 * skips it). It is not in the app process: several app instances on one host would fight over the
 * port, while any number of listeners (one per host or port) can share the database safely.
 * EBB_MLLP_PORT (default 2575), EBB_MLLP_HOST (default 127.0.0.1).
 */
import { startMllpListener } from '../src/lib/server/hl7/listener.ts';
import { closeDb } from '../src/lib/server/queries/db.ts';

const port = Number(process.env.EBB_MLLP_PORT ?? 2575);
const host = process.env.EBB_MLLP_HOST ?? '127.0.0.1';
const listener = await startMllpListener(port, host, (line) => console.log(`[mllp] ${line}`));
console.log(`[mllp] HL7 v2 listener on ${host}:${listener.port}`);

async function stop() {
  await listener.close();
  await closeDb();
  process.exit(0);
}
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
