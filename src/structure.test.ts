/**
 * Layout rules that a reviewer would otherwise have to remember (DEVELOPERS.md, "Shapes we keep"):
 * checked over the files themselves so a new file that breaks one fails the unit run.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, normalize, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('..', import.meta.url));
const CODE = /\.(ts|tsx|mts|mjs|js|astro)$/;

function filesUnder(dir: string): string[] {
  return readdirSync(join(root, dir), { withFileTypes: true }).flatMap((e) => {
    const path = join(dir, e.name);
    if (e.isDirectory()) return e.name === 'node_modules' ? [] : filesUnder(path);
    return CODE.test(e.name) ? [path] : [];
  });
}

/** Every module specifier a file imports or re-exports, static or dynamic, with its line. */
export function importSpecifiers(text: string): { line: number; spec: string }[] {
  const out: { line: number; spec: string }[] = [];
  const patterns = [
    /\b(?:import|export)\s[^'"`;]*?\bfrom\s*['"]([^'"]+)['"]/g,
    /\bimport\s*['"]([^'"]+)['"]/g,
    /\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g,
  ];
  for (const re of patterns) {
    for (const m of text.matchAll(re)) out.push({ line: text.slice(0, m.index).split('\n').length, spec: m[1]! });
  }
  return out;
}

/** Imports that climb more than two folders (`../../../x`): use `~/…` inside src instead. */
export function deepClimbs(text: string): { line: number; spec: string }[] {
  return importSpecifiers(text).filter(({ spec }) => /^(\.\.\/){3,}/.test(spec));
}

describe('import paths', () => {
  it('finds imports of every form (checking the checker)', () => {
    const up3 = '../'.repeat(3); // built, so this file does not trip its own check
    const sample = [
      `import a from '${up3}a.ts';`,
      "import type { B } from '../b.ts';",
      `export { c } from '../${up3}c.ts';`,
      `import '${up3}side-effect.css';`,
      `const d = await import('${up3}d.ts');`,
      "import {\n  e,\n} from '~/lib/e.ts';",
    ].join('\n');
    expect(deepClimbs(sample).map((x) => x.spec)).toEqual([
      `${up3}a.ts`,
      `../${up3}c.ts`,
      `${up3}side-effect.css`,
      `${up3}d.ts`,
    ]);
    expect(importSpecifiers(sample).map((x) => x.spec)).toContain('~/lib/e.ts');
  });

  it('no file under src/ or test/ has an import that climbs more than two folders', () => {
    const files = [...filesUnder('src'), ...filesUnder('test')];
    expect(files.length).toBeGreaterThan(50);
    const offenders = files.flatMap((f) =>
      deepClimbs(readFileSync(join(root, f), 'utf8')).map(
        (x) => `${relative(root, join(root, f))}:${x.line} ${x.spec}`,
      ),
    );
    expect(offenders).toEqual([]);
  });
});

/**
 * Imports from a browser-side file (anything under src/components, or any .tsx island) into
 * src/lib/server, by `~/lib/server/…` or by a relative path that lands there. Islands read the API's
 * JSON shapes from `src/lib/<domain>/api-types.ts`; server modules never reach the browser bundle.
 */
export function serverImports(file: string, text: string): { line: number; spec: string }[] {
  return importSpecifiers(text).filter(({ spec }) => {
    const target = spec.startsWith('~/')
      ? join('src', spec.slice(2))
      : spec.startsWith('.')
        ? normalize(join(dirname(file), spec))
        : null;
    return (
      target !== null &&
      (target === join('src', 'lib', 'server') || target.startsWith(`${join('src', 'lib', 'server')}/`))
    );
  });
}

const browserSide = (f: string) => f.startsWith(`${join('src', 'components')}/`) || f.endsWith('.tsx');

describe('browser code and server code', () => {
  it('finds server imports of every form (checking the checker)', () => {
    const sample = [
      "import type { A } from '~/lib/server/a.ts';",
      "import { b } from '../../lib/server/queries/b.ts';",
      "import type { C } from '~/lib/board/api-types.ts';",
      "import { d } from '../server-side.ts';",
      "const e = await import('~/lib/server');",
    ].join('\n');
    expect(serverImports('src/components/board/X.tsx', sample).map((x) => x.spec)).toEqual([
      '~/lib/server/a.ts',
      '../../lib/server/queries/b.ts',
      '~/lib/server',
    ]);
    expect(serverImports('src/lib/board/x.ts', "import { y } from '../server/y.ts';").map((x) => x.spec)).toEqual([
      '../server/y.ts',
    ]);
  });

  it('no component and no .tsx island imports from src/lib/server', () => {
    const files = filesUnder('src').filter(browserSide);
    expect(files.length).toBeGreaterThan(20);
    const offenders = files.flatMap((f) =>
      serverImports(f, readFileSync(join(root, f), 'utf8')).map((x) => `${f}:${x.line} ${x.spec}`),
    );
    expect(offenders).toEqual([]);
  });
});
