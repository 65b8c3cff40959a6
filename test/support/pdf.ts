/** Printing a page to PDF in Chromium and reading the text back with pdftotext (Debian's poppler-utils). */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';

/** The page's print, one string per printed page (the page's own @page size and margins). */
export async function printedPages(page: Page): Promise<string[]> {
  const dir = mkdtempSync(join(tmpdir(), 'ebb-pdf-'));
  try {
    const file = join(dir, 'print.pdf');
    await page.pdf({ path: file, preferCSSPageSize: true, printBackground: true });
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    const pages = text.split('\f');
    if (pages[pages.length - 1]!.trim() === '') pages.pop(); // pdftotext ends every page with a form feed
    return pages;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Page size in PDF points from pdfinfo ("Page size: 841.89 x 595.276 pts (A4)"). */
export async function printedPageSize(page: Page): Promise<{ width: number; height: number }> {
  const dir = mkdtempSync(join(tmpdir(), 'ebb-pdf-'));
  try {
    const file = join(dir, 'print.pdf');
    await page.pdf({ path: file, preferCSSPageSize: true });
    const info = execFileSync('pdfinfo', [file], { encoding: 'utf8' });
    const m = /Page size:\s+([\d.]+) x ([\d.]+)/.exec(info);
    if (!m) throw new Error(`pdfinfo gave no page size: ${info}`);
    return { width: Number(m[1]), height: Number(m[2]) };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
