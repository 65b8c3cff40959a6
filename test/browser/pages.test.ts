/**
 * Every page of the app (test/support/pages.ts), in a real browser:
 * - the table names every page file under src/pages;
 * - reflow: at 1440, 390 and 320 CSS px wide the document never scrolls sideways (WCAG 2.1 1.4.10),
 *   and every stacked table's cell labels are its column headers;
 * - axe-core (the accessibility engine) by day and by night: no serious or critical violation.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createRequire } from 'node:module';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { APP_URL } from '../support/app.ts';
import { launchBrowser, signInThroughForm, waitForIsland } from '../support/browser.ts';
import {
  APP_PAGES,
  demoEmail,
  demoPatientId,
  resolvePath,
  setPasswordLinkToken,
  type AppPage,
  type DemoRole,
  type PageFixtures,
} from '../support/pages.ts';

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
let browser: Browser;
let fixtures: PageFixtures;
const contexts = new Map<string, BrowserContext>();

beforeAll(async () => {
  browser = await launchBrowser();
  fixtures = { patient: await demoPatientId(), link: await setPasswordLinkToken() };
}, 60_000);
afterAll(async () => {
  for (const c of contexts.values()) await c.close();
  await browser?.close();
});

/** One signed-in context per role and theme, reused across pages. */
async function contextFor(role: DemoRole | null, night: boolean): Promise<BrowserContext> {
  const key = `${role ?? 'anon'}-${night}`;
  let context = contexts.get(key);
  if (context) return context;
  // bypassCSP: the app's CSP (rightly) refuses inline scripts, and axe-core is injected as one.
  context = await browser.newContext({ viewport: { width: 1440, height: 900 }, bypassCSP: true });
  if (role) {
    const page = await context.newPage();
    await signInThroughForm(page, demoEmail(role));
    await page.close();
  }
  const { hostname } = new URL(APP_URL);
  await context.addCookies([{ name: 'ebb-theme', value: night ? 'night' : 'day', domain: hostname, path: '/' }]);
  contexts.set(key, context);
  return context;
}

async function open(p: AppPage, night: boolean, width = 1440): Promise<Page> {
  const context = await contextFor(p.as, night);
  const page = await context.newPage();
  await page.setViewportSize({ width, height: 900 });
  const res = await page.goto(`${APP_URL}${resolvePath(p, fixtures)}`);
  expect(res?.status(), `${p.name}: ${p.path}`).toBe(p.status ?? 200);
  if (p.ready) await waitForIsland(page, p.ready);
  await page.waitForLoadState('networkidle').catch(() => {});
  return page;
}

describe('the page table', () => {
  it('has a row for every page file under src/pages', () => {
    const pagesDir = fileURLToPath(new URL('../../src/pages', import.meta.url));
    const walk = (dir: string): string[] =>
      readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
        e.isDirectory()
          ? walk(join(dir, e.name))
          : e.name.endsWith('.astro')
            ? [relative(pagesDir, join(dir, e.name))]
            : [],
      );
    const listed = new Set(APP_PAGES.map((p) => p.file));
    expect(
      walk(pagesDir).filter((f) => !listed.has(f)),
      'pages missing from APP_PAGES in test/support/pages.ts',
    ).toEqual([]);
  });
});

/**
 * In the page, at phone width: the data tables on screen. A stacked table (`stack-table`) shows each
 * cell's label, and the label is its column's header; any other table fits without scrolling in
 * its own box. Returns what is wrong, in words.
 */
function phoneTableProblems(): string[] {
  const problems: string[] = [];
  for (const table of document.querySelectorAll('main table')) {
    // Print-only tables and tables in closed <details> are not on screen.
    if (!(table instanceof HTMLTableElement) || !table.checkVisibility()) continue;
    const name = table.dataset.testid ?? table.caption?.textContent ?? 'table';
    if (!table.classList.contains('stack-table')) {
      if (table.scrollWidth > table.clientWidth + 1)
        problems.push(`${name}: scrolls inside its own box (give it stack-table and data-label)`);
      continue;
    }
    const headers = [...(table.tHead?.rows[0]?.cells ?? [])].map((c) => c.textContent?.trim() ?? '');
    for (const row of [...table.tBodies].flatMap((b) => [...b.rows])) {
      const cells = [...row.cells];
      cells.forEach((cell, i) => {
        const label = cell.dataset.label;
        if (label === undefined) return;
        if (cells.length === headers.length && label !== headers[i])
          problems.push(`${name}: column ${i + 1} labelled "${label}" under the header "${headers[i]}"`);
        const shown = getComputedStyle(cell, '::before').content;
        if (shown !== JSON.stringify(label)) problems.push(`${name}: the label "${label}" is not shown (${shown})`);
      });
    }
    if (table.scrollWidth > table.clientWidth + 1) problems.push(`${name}: a stacked table still scrolls sideways`);
  }
  return problems;
}

describe('no page scrolls sideways (WCAG 2.1 1.4.10 reflow)', () => {
  for (const p of APP_PAGES) {
    it(`${p.name} at 1440, 390 and 320 px`, async () => {
      const page = await open(p, false);
      const widths: Record<number, { scroll: number; viewport: number; wide: string[]; tables: string[] }> = {};
      for (const width of [1440, 390, 320]) {
        await page.setViewportSize({ width, height: 900 });
        await page.waitForTimeout(250); // charts re-measure their containers
        widths[width] = await page.evaluate(() => {
          const viewport = document.documentElement.clientWidth;
          // Name the elements that stick out, so a failure says where to look.
          const wide = [...document.querySelectorAll('body *')]
            .filter((e) => e.getBoundingClientRect().right > viewport + 1 && e.getBoundingClientRect().width > 0)
            .slice(-4)
            .map((e) => `${e.tagName.toLowerCase()}${e.id ? `#${e.id}` : ''}.${String(e.className).slice(0, 60)}`);
          return { scroll: document.documentElement.scrollWidth, viewport, wide, tables: [] as string[] };
        });
        if (width < 640) widths[width]!.tables = await page.evaluate(phoneTableProblems);
      }
      await page.close();
      for (const width of [1440, 390, 320]) {
        expect(
          widths[width]!.scroll,
          `${p.name} at ${width} px: ${widths[width]!.wide.join(' | ')}`,
        ).toBeLessThanOrEqual(widths[width]!.viewport);
        expect(widths[width]!.tables, `${p.name}: tables at ${width} px`).toEqual([]);
      }
    }, 60_000);
  }
});

describe('axe-core finds no serious or critical violation, by day and by night', () => {
  for (const night of [false, true]) {
    for (const p of APP_PAGES) {
      it(`${p.name} ${night ? 'by night' : 'by day'}`, async () => {
        const page = await open(p, night);
        expect(await page.evaluate(() => document.documentElement.classList.contains('night'))).toBe(night);
        await page.addScriptTag({ content: AXE_SOURCE });
        const result = await page.evaluate(async () => {
          const axe = (
            window as unknown as {
              axe: {
                run: (
                  ctx: Document,
                  o: object,
                ) => Promise<{ violations: { id: string; impact: string; nodes: { target: string[] }[] }[] }>;
              };
            }
          ).axe;
          const r = await axe.run(document, { resultTypes: ['violations'] });
          return r.violations.map((v) => ({
            id: v.id,
            impact: v.impact,
            nodes: v.nodes.slice(0, 5).map((n) => n.target.join(' ')),
          }));
        });
        await page.close();
        const bad = result.filter((v) => v.impact === 'serious' || v.impact === 'critical');
        expect(bad, `${p.name} ${night ? 'night' : 'day'}`).toEqual([]);
      }, 60_000);
    }
  }
});
