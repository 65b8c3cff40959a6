/**
 * Every page of the app, once: the browser suite walks this table for the reflow (width) test and
 * the accessibility engine, by day and by night. A new page is one line here.
 * `as`: the demo account that opens it (null: signed out). `path` may hold `:patient` — the
 * demo patient in bed 4-01 (the one with the desaturation). `ready`: a test id to wait for.
 */
import { testDb } from './db.ts';

export type DemoRole = 'nurse' | 'charge' | 'intensivist' | 'outreach' | 'admin';
export interface AppPage { name: string; path: string; as: DemoRole | null; ready?: string; status?: number }

export const APP_PAGES: AppPage[] = [
  { name: 'sign in', path: '/signin', as: null },
  { name: 'forbidden', path: '/forbidden', as: 'nurse', status: 403 },
  { name: 'units', path: '/', as: 'charge' },
  { name: 'ward board', path: '/board', as: 'charge', ready: 'board-tiles' },
  { name: 'patients', path: '/patients', as: 'charge' },
  { name: 'bed chart (nurse)', path: '/patients/:patient', as: 'nurse', ready: 'chart-summary' },
  { name: 'bed chart (intensivist)', path: '/patients/:patient', as: 'intensivist', ready: 'chart-summary' },
  { name: 'escalations', path: '/escalations', as: 'outreach' },
  { name: 'pleth check', path: '/pleth', as: 'nurse' },
  { name: 'admin: users', path: '/admin/users', as: 'admin' },
  { name: 'admin: unit settings', path: '/admin/settings', as: 'admin' },
  { name: 'admin: device keys', path: '/admin/devices', as: 'admin' },
  { name: 'admin: mail', path: '/admin/mail', as: 'admin' },
];

export const demoEmail = (role: DemoRole) => `${role}@harbourside.example`;

/** The demo patient in bed 4-01 now. */
export async function demoPatientId(): Promise<number> {
  const db = testDb();
  try {
    const stay = await db('bed_stays as s').join('beds as b', 'b.id', 's.bed_id').where('b.label', '4-01').whereNull('s.ended_at').first('s.patient_id');
    return Number(stay.patient_id);
  } finally {
    await db.destroy();
  }
}

export function resolvePath(page: AppPage, patientId: number): string {
  return page.path.replace(':patient', String(patientId));
}
