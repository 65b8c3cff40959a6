/**
 * Tables become stacked rows on a phone (issue 11): below 640 px each row of a data table is a block
 * and each value carries its column's name as visible text; at a desk, and on paper, they are normal
 * tables with column headers. Checked on the bed chart's obs record (and blood gases) and on two
 * admin tables, in a real browser.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { APP_URL } from '../support/app.ts';
import { launchBrowser, signInThroughForm, waitForIsland } from '../support/browser.ts';
import { demoEmail, demoPatientId, type DemoRole } from '../support/pages.ts';

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
let browser: Browser;
let patientId: number;
const contexts: BrowserContext[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
  patientId = await demoPatientId();
}, 60_000);
afterAll(async () => {
  for (const c of contexts) await c.close();
  await browser?.close();
});

async function openAs(role: DemoRole, path: string, tables: string[], width: number, night = false): Promise<Page> {
  const context = await browser.newContext({ viewport: { width, height: 900 }, bypassCSP: true });
  contexts.push(context);
  const page = await context.newPage();
  await signInThroughForm(page, demoEmail(role));
  await context.addCookies([
    { name: 'ebb-theme', value: night ? 'night' : 'day', domain: new URL(APP_URL).hostname, path: '/' },
  ]);
  await page.goto(`${APP_URL}${path}`);
  for (const t of tables) {
    await waitForIsland(page, t);
    await page.locator(`[data-testid="${t}"] tbody tr`).first().waitFor();
  }
  return page;
}

interface TableShape {
  display: string;
  rowDisplay: string;
  headerVisible: boolean;
  rows: number;
  /** Per labelled cell: its label, the header of its column, what its ::before shows and where the value starts. */
  cells: {
    label: string;
    header: string;
    shown: string;
    valueLeft: number;
    cellLeft: number;
    top: number;
    nextTop: number;
  }[];
  /** The table and its scrolling box (if any): scroll width against client width. */
  scroll: { table: [number, number]; box: [number, number] | null };
  docScroll: number;
  viewport: number;
}

function shapeOf(page: Page, testId: string): Promise<TableShape> {
  return page.evaluate((id) => {
    const table = document.querySelector(`[data-testid="${id}"]`) as HTMLTableElement;
    const headers = [...(table.tHead?.rows[0]?.cells ?? [])].map((c) => c.textContent?.trim() ?? '');
    const rows = [...table.tBodies[0]!.rows].filter((r) => r.cells.length === headers.length);
    const cells = rows.slice(0, 5).flatMap((r) =>
      [...r.cells]
        .filter((c) => c.dataset.label !== undefined)
        .map((c) => {
          const range = document.createRange();
          range.selectNodeContents(c);
          const next = c.nextElementSibling;
          return {
            label: c.dataset.label!,
            header: headers[c.cellIndex] ?? '',
            shown: getComputedStyle(c, '::before').content,
            valueLeft: range.getBoundingClientRect().width > 0 ? range.getBoundingClientRect().left : Infinity,
            cellLeft: c.getBoundingClientRect().left,
            top: c.getBoundingClientRect().top,
            nextTop: next ? next.getBoundingClientRect().top : Infinity,
          };
        }),
    );
    const box =
      table.parentElement && getComputedStyle(table.parentElement).overflowX === 'auto' ? table.parentElement : null;
    const head = table.tHead!.getBoundingClientRect();
    return {
      display: getComputedStyle(table).display,
      rowDisplay: getComputedStyle(rows[0]!).display,
      headerVisible: head.width > 10 && head.height > 5,
      rows: rows.length,
      cells,
      scroll: { table: [table.scrollWidth, table.clientWidth], box: box ? [box.scrollWidth, box.clientWidth] : null },
      docScroll: document.documentElement.scrollWidth,
      viewport: document.documentElement.clientWidth,
    };
  }, testId);
}

function expectStacked(s: TableShape, name: string) {
  expect(s.rows, `${name}: rows to look at`).toBeGreaterThan(0);
  expect(s.display, name).toBe('block');
  expect(s.rowDisplay, name).toBe('block');
  expect(s.headerVisible, `${name}: the header row is out of sight`).toBe(false);
  expect(s.cells.length).toBeGreaterThan(0);
  for (const c of s.cells) {
    expect(c.label, name).toBe(c.header);
    expect(c.shown, `${name}: "${c.label}" is shown as text`).toBe(JSON.stringify(c.label));
    // The value sits beside its label, not under it, and each cell is on its own line.
    expect(c.valueLeft - c.cellLeft, `${name}: "${c.label}" value leaves room for the label`).toBeGreaterThanOrEqual(
      100,
    );
    expect(c.nextTop, `${name}: "${c.label}" stacks above the next cell`).toBeGreaterThan(c.top);
  }
  // No scrolling box: the table fits its column, and the page fits the screen.
  expect(s.scroll.table[0], `${name}: table scroll width`).toBeLessThanOrEqual(s.scroll.table[1] + 1);
  if (s.scroll.box) expect(s.scroll.box[0], `${name}: box scroll width`).toBeLessThanOrEqual(s.scroll.box[1] + 1);
  expect(s.docScroll, `${name}: document scroll width`).toBeLessThanOrEqual(s.viewport);
}

function expectTable(s: TableShape, name: string) {
  expect(s.rows, `${name}: rows to look at`).toBeGreaterThan(0);
  expect(s.display, name).toBe('table');
  expect(s.rowDisplay, name).toBe('table-row');
  expect(s.headerVisible, `${name}: the header row is shown`).toBe(true);
  for (const c of s.cells) expect(c.shown, `${name}: no label before "${c.label}" in a table`).toBe('none');
}

const CASES: { name: string; role: DemoRole; path: () => string; tables: string[] }[] = [
  { name: 'bed chart', role: 'nurse', path: () => `/patients/${patientId}`, tables: ['obs-table', 'gas-table'] },
  { name: 'admin: users', role: 'admin', path: () => '/admin/users', tables: ['user-table'] },
  { name: 'admin: audit', role: 'admin', path: () => '/admin/audit', tables: ['audit-table'] },
];

describe('data tables stack on a phone and are tables at a desk', () => {
  for (const c of CASES) {
    it(`${c.name}: stacked rows with visible labels at 390 px`, async () => {
      const page = await openAs(c.role, c.path(), c.tables, 390);
      for (const t of c.tables) expectStacked(await shapeOf(page, t), `${c.name} ${t}`);
      await page.close();
    });

    it(`${c.name}: normal tables with column headers at 1440 px`, async () => {
      const page = await openAs(c.role, c.path(), c.tables, 1440);
      for (const t of c.tables) {
        expectTable(await shapeOf(page, t), `${c.name} ${t}`);
        const headers = await page.getByTestId(t).getByRole('columnheader').count();
        expect(headers, `${t}: column headers for screen readers`).toBeGreaterThan(2);
      }
      await page.close();
    });
  }

  it('the stacked labels meet axe-core at 390 px by day and by night (no serious or critical violation)', async () => {
    for (const night of [false, true]) {
      for (const c of CASES) {
        const page = await openAs(c.role, c.path(), c.tables, 390, night);
        await page.addScriptTag({ content: AXE_SOURCE });
        const bad = await page.evaluate(async () => {
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
          return r.violations
            .filter((v) => v.impact === 'serious' || v.impact === 'critical')
            .map(
              (v) =>
                `${v.id}: ${v.nodes
                  .slice(0, 3)
                  .map((n) => n.target.join(' '))
                  .join(', ')}`,
            );
        });
        expect(bad, `${c.name} ${night ? 'by night' : 'by day'} at 390 px`).toEqual([]);
        await page.close();
      }
    }
  }, 120_000);

  it('on paper the tables stay tables, even from a phone-wide window', async () => {
    const page = await openAs('nurse', `/patients/${patientId}`, ['obs-table'], 390);
    await page.emulateMedia({ media: 'print' });
    const displays = await page.evaluate(() =>
      [...document.querySelectorAll('table')].map((t) => getComputedStyle(t).display),
    );
    expect(displays.length).toBeGreaterThan(0);
    expect(
      displays.every((d) => d === 'table' || d === 'none'),
      displays.join(', '),
    ).toBe(true);
    await page.close();
  });
});
