/**
 * Every page of the app, once: the browser suite walks this table for the reflow (width) test and
 * the accessibility engine, by day and by night. A new page is one line here
 * (`test/browser/pages.test.ts` fails when a file under src/pages has no row).
 * `as`: the demo account that opens it (null: signed out). `path` may hold `:patient` — the
 * demo patient in bed 4-01 (the one with the desaturation) — and `:link`, the token of a fresh
 * set-password link. `ready`: a test id to wait for (an island that loads its data).
 * `file`: the page's file under src/pages.
 */
import { createHash, randomBytes } from 'node:crypto';
import { createUser, testDb } from './db.ts';

export type DemoRole = 'nurse' | 'charge' | 'intensivist' | 'outreach' | 'admin';
export interface AppPage {
  name: string;
  file: string;
  path: string;
  as: DemoRole | null;
  ready?: string;
  status?: number;
}

export const APP_PAGES: AppPage[] = [
  { name: 'sign in', file: 'signin.astro', path: '/signin', as: null },
  {
    name: 'set password (link)',
    file: 'set-password.astro',
    path: '/set-password?token=:link',
    as: null,
    ready: 'password-form',
  },
  { name: 'set password (no link)', file: 'set-password.astro', path: '/set-password', as: null, status: 404 },
  { name: 'forbidden', file: 'forbidden.astro', path: '/forbidden', as: 'nurse', status: 403 },
  { name: 'not found', file: '404.astro', path: '/no-such-page', as: 'nurse', status: 404 },
  { name: 'units', file: 'index.astro', path: '/', as: 'charge' },
  { name: 'ward board', file: 'board.astro', path: '/board', as: 'charge', ready: 'board-tiles' },
  { name: 'patients', file: 'patients/index.astro', path: '/patients', as: 'charge', ready: 'patient-table' },
  {
    name: 'bed chart (nurse)',
    file: 'patients/[id].astro',
    path: '/patients/:patient',
    as: 'nurse',
    ready: 'chart-summary',
  },
  {
    name: 'bed chart (intensivist)',
    file: 'patients/[id].astro',
    path: '/patients/:patient',
    as: 'intensivist',
    ready: 'chart-summary',
  },
  { name: 'escalations', file: 'escalations.astro', path: '/escalations', as: 'outreach', ready: 'queue-notice' },
  {
    name: 'claim link (no token)',
    file: 'escalations/claim.astro',
    path: '/escalations/claim',
    as: 'outreach',
    status: 400,
  },
  { name: 'pleth check', file: 'pleth.astro', path: '/pleth', as: 'nurse', ready: 'strip-file' },
  { name: 'handover (nurse)', file: 'handover.astro', path: '/handover', as: 'nurse' },
  { name: 'handover (charge)', file: 'handover.astro', path: '/handover', as: 'charge' },
  { name: 'unit report', file: 'reports.astro', path: '/reports', as: 'charge', ready: 'report-view' },
  { name: 'unit report (every unit)', file: 'reports.astro', path: '/reports?view=hospital', as: 'intensivist' },
  { name: 'my account', file: 'account.astro', path: '/account', as: 'nurse', ready: 'password-form' },
  { name: 'admin: users', file: 'admin/users.astro', path: '/admin/users', as: 'admin', ready: 'user-table' },
  { name: 'admin: units and beds', file: 'admin/units.astro', path: '/admin/units', as: 'admin', ready: 'create-unit' },
  { name: 'admin: unit settings', file: 'admin/settings.astro', path: '/admin/settings', as: 'admin' },
  { name: 'admin: audit', file: 'admin/audit.astro', path: '/admin/audit', as: 'admin', ready: 'audit-table' },
  {
    name: 'admin: device keys',
    file: 'admin/devices.astro',
    path: '/admin/devices',
    as: 'admin',
    ready: 'device-key-table',
  },
  {
    name: 'admin: HL7 gateways',
    file: 'admin/gateways.astro',
    path: '/admin/gateways',
    as: 'admin',
    ready: 'hl7-gateways',
  },
  { name: 'admin: mail', file: 'admin/mail.astro', path: '/admin/mail', as: 'admin', ready: 'outbox' },
];

export const demoEmail = (role: DemoRole) => `${role}@harbourside.example`;

/** The demo patient in a demo bed now (4-01, the one with the desaturation, unless named). */
export async function demoPatientId(bedLabel = '4-01'): Promise<number> {
  const db = testDb();
  try {
    const stay = await db('bed_stays as s')
      .join('beds as b', 'b.id', 's.bed_id')
      .where('b.label', bedLabel)
      .whereNull('s.ended_at')
      .first('s.patient_id');
    return Number(stay.patient_id);
  } finally {
    await db.destroy();
  }
}

/**
 * A fresh set-password link for a fixture account (the database keeps only the token's SHA-256,
 * as `createLink` in src/lib/server/staff.ts does), so the form behind a link is walked too.
 */
export async function setPasswordLinkToken(): Promise<string> {
  const db = testDb();
  try {
    const user = await createUser(db, { role: 'nurse', unitId: (await db('units').orderBy('id').first('id')).id });
    const token = randomBytes(32).toString('base64url');
    const now = new Date();
    await db('password_links').insert({
      user_id: user.id,
      token_hash: createHash('sha256').update(token).digest('hex'),
      purpose: 'invite',
      created_by: null,
      created_at: now,
      expires_at: new Date(now.getTime() + 3_600_000),
    });
    return token;
  } finally {
    await db.destroy();
  }
}

export interface PageFixtures {
  patient: number;
  link: string;
}

export function resolvePath(page: AppPage, fixtures: PageFixtures): string {
  return page.path.replace(':patient', String(fixtures.patient)).replace(':link', fixtures.link);
}
