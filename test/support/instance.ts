/** Starts another instance of the built app (same build as the test app) with its own environment. */
import { spawn, type ChildProcess } from 'node:child_process';
import { resolve } from 'node:path';

export async function startInstance(
  port: number,
  env: Record<string, string>,
): Promise<{ url: string; stop: () => Promise<void>; child: ChildProcess }> {
  const entry = resolve(process.env.EBB_OUT_DIR ?? 'dist', 'server/entry.mjs');
  const child: ChildProcess = spawn(process.execPath, [entry], {
    env: { ...process.env, HOST: '127.0.0.1', PORT: String(port), EBB_BACKGROUND: 'off', ...env },
    stdio: 'ignore',
  });
  const url = `http://127.0.0.1:${port}`;
  const until = Date.now() + 30_000;
  for (;;) {
    try {
      await fetch(`${url}/api/health`);
      break;
    } catch {
      if (Date.now() > until) throw new Error('second instance did not start');
      await new Promise((r) => setTimeout(r, 200));
    }
  }
  return {
    url,
    child,
    stop: () =>
      new Promise((done) => {
        child.once('exit', () => done());
        child.kill();
      }),
  };
}
