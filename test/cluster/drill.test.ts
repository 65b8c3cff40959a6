import { spawn } from 'node:child_process';
import { describe, expect, it } from 'vitest';

// The short form of the hospital-group drill (docker-free-scripts/drill.sh): a three-node Galera
// cluster behind HAProxy, two app instances, the real ingest path, board pollers and nurses
// charting, the writer node SIGKILLed and restarted. What it prints is what this test reads.
function runDrill(...options: string[]): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const child = spawn('bash', ['docker-free-scripts/drill.sh', 'cluster', '--short', ...options], {
      env: {
        ...process.env,
        DRILL_REUSE_BUILD: '1',
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
    child.on('exit', (code) => resolve({ code, out }));
  });
}

const figure = (out: string, label: string) => {
  const m = new RegExp(`^cluster: ${label.replace(/[()]/g, '\\$&')}: (.*)$`, 'm').exec(out);
  if (!m) throw new Error(`the drill printed no "${label}" line`);
  return m[1]!;
};

function expectNothingLostOrDuplicated(out: string) {
  const [acked, stored] = figure(out, 'readings acknowledged vs stored').split(' vs ').map(Number);
  expect(acked).toBeGreaterThan(1000);
  expect(stored).toBeGreaterThanOrEqual(acked!);
  expect(figure(out, 'readings lost')).toBe('0');
  expect(figure(out, 'duplicate readings')).toBe('0');
  expect(figure(out, 'escalations expected vs raised')).toMatch(/^(\d+) vs \1 \(0 unexpected, 0 duplicate\)$/);
  const [mailsExpected, mailsReceived] = figure(out, 'mails expected vs received').split(' vs ').map(Number);
  expect(mailsExpected).toBeGreaterThan(0);
  expect(mailsReceived).toBe(mailsExpected);
  expect(figure(out, 'duplicate mails')).toBe('0');
}

describe('cluster drill (short form)', () => {
  it(
    'loses nothing acknowledged and duplicates nothing while a database node is killed and rejoins',
    async () => {
      const { code, out } = await runDrill();
      expect(out).toMatch(/node 1 rejoined; cluster size 3/);
      expectNothingLostOrDuplicated(out);
      expect(code).toBe(0);
    },
    15 * 60_000,
  );

  it(
    'keeps each escalation and each mail once when two nodes take writes at the same time',
    async () => {
      const { code, out } = await runDrill('--two-writers');
      expect(out).toMatch(/each app instance writing to its own node/);
      expectNothingLostOrDuplicated(out);
      expect(code).toBe(0);
    },
    15 * 60_000,
  );
});
