import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

// Statements a Galera cluster refuses or does not replicate as one would expect: explicit table
// locks and named locks are local to one node, and MyISAM tables are not replicated at all.
const FORBIDDEN = [/\bLOCK\s+TABLES?\b/i, /\bGET_LOCK\s*\(/i, /\bRELEASE_LOCK\s*\(/i, /ENGINE\s*=\s*MyISAM/i];

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return files(path);
    return /\.(ts|tsx|astro)$/.test(name) && !/\.test\.tsx?$/.test(name) ? [path] : [];
  });
}

describe('no statement a Galera cluster handles badly', () => {
  it('appears in the app or its migrations', () => {
    const hits = ['src', 'db'].flatMap(files).flatMap((path) => {
      const text = readFileSync(path, 'utf8');
      return FORBIDDEN.filter((re) => re.test(text)).map((re) => `${path}: ${re}`);
    });
    expect(files('src').length).toBeGreaterThan(50);
    expect(hits).toEqual([]);
  });
});
