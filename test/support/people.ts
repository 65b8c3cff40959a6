/** Fixture staff, each signed in through the real sign-in flow. */
import type { Knex } from 'knex';
import { HttpSession, signedIn } from './app.ts';
import { createUser } from './db.ts';

/** One fresh user per entry ({ key: [role, unitId] }); `sessions.anon` is a signed-out client. */
export async function signInPeople(db: Knex, people: Record<string, [string, number | null]>) {
  const sessions: Record<string, HttpSession> = { anon: new HttpSession() };
  const ids: Record<string, number> = {};
  for (const [key, [role, unitId]] of Object.entries(people)) {
    const u = await createUser(db, { role, unitId });
    ids[key] = u.id;
    sessions[key] = await signedIn(u.email, u.password);
  }
  return { sessions, ids };
}
