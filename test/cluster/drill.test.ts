import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

// The short form of the hospital-group drill (docker-free-scripts/drill.sh): a three-node Galera
// cluster behind HAProxy, two app instances, the real ingest path, board pollers and nurses
// charting, the writer node SIGKILLed and restarted. The drill writes its figures as JSON
// (DRILL_FIGURES); this test reads them, and the printed log only for the fault steps.
interface DrillFigures {
  readingsAcknowledged: number;
  readingsStored: number;
  readingsLost: number;
  duplicateReadings: number;
  escalationsExpected: number;
  escalationsRaised: number;
  unexpectedEscalations: number;
  duplicateEscalations: number;
  mailsExpected: number;
  mailsReceived: number;
  duplicateMails: number;
}

function runDrill(...options: string[]): Promise<{ code: number | null; out: string; figures: DrillFigures }> {
  const figuresFile = join(mkdtempSync(join(tmpdir(), 'ebb-drill-')), 'cluster.json');
  return new Promise((resolve, reject) => {
    const child = spawn('bash', ['docker-free-scripts/drill.sh', 'cluster', '--short', ...options], {
      env: {
        ...process.env,
        DRILL_REUSE_BUILD: '1',
        DRILL_FIGURES: figuresFile,
        ...(options.includes('--two-writers') ? { DRILL_SECONDS: '90' } : {}),
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    child.stdout.on('data', (d) => {
      out += d;
      process.stdout.write(d);
    });
    child.stderr.on('data', (d) => {
      out += d;
      process.stderr.write(d);
    });
    child.on('exit', (code) => {
      try {
        resolve({ code, out, figures: JSON.parse(readFileSync(figuresFile, 'utf8')) as DrillFigures });
      } catch (err) {
        reject(new Error(`the drill wrote no figures (exit ${code}): ${(err as Error).message}`));
      }
    });
  });
}

function expectNothingLostOrDuplicated(f: DrillFigures) {
  expect(f.readingsAcknowledged).toBeGreaterThan(1000);
  expect(f.readingsStored).toBeGreaterThanOrEqual(f.readingsAcknowledged);
  expect(f.readingsLost).toBe(0);
  expect(f.duplicateReadings).toBe(0);
  expect(f.escalationsRaised).toBe(f.escalationsExpected);
  expect(f.unexpectedEscalations).toBe(0);
  expect(f.duplicateEscalations).toBe(0);
  expect(f.mailsExpected).toBeGreaterThan(0);
  expect(f.mailsReceived).toBe(f.mailsExpected);
  expect(f.duplicateMails).toBe(0);
}

describe('cluster drill (short form)', () => {
  it(
    'loses nothing acknowledged and duplicates nothing while a database node is killed and rejoins',
    async () => {
      const { code, out, figures } = await runDrill();
      expect(out).toMatch(/node 1 rejoined; cluster size 3/);
      expectNothingLostOrDuplicated(figures);
      expect(code).toBe(0);
    },
    15 * 60_000,
  );

  it(
    'keeps each escalation and each mail once when two nodes take writes at the same time',
    async () => {
      const { code, out, figures } = await runDrill('--two-writers');
      expect(out).toMatch(/each app instance writing to its own node/);
      expectNothingLostOrDuplicated(figures);
      expect(code).toBe(0);
    },
    15 * 60_000,
  );
});
