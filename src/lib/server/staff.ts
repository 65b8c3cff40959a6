/**
 * Staff accounts run by administrators: create, change role or unit, deactivate / reactivate,
 * and set-password links sent through the mail outbox. Every change is audited in its transaction.
 */
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { createHash, randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { spansUnits, type Role } from '~/lib/auth/roles.ts';
import { unitRuleProblem, type CreateUserInput, type UpdateUserInput } from '~/lib/staff/inputs.ts';
import { LINK_HOURS, setPasswordMail } from '~/lib/staff/link-mail.ts';
import { ApiError } from './http.ts';
import { writeAudit } from './queries/audit.ts';
import { enqueueMail } from './queries/outbox.ts';
import {
  expireOpenLinks,
  insertLink,
  insertStaff,
  lockActiveAdmins,
  lockStaff,
  unitIdByCode,
  unitZoneOf,
  updateStaff,
  type StaffRow,
} from './queries/staff.ts';
import { publicOrigin } from './escalations/engine.ts';
import { endSessionsOf } from './session-revoke.ts';

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

function isDuplicate(err: unknown): boolean {
  return (err as { code?: string })?.code === 'ER_DUP_ENTRY';
}

function view(row: StaffRow) {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    unitCode: row.unit_code,
    active: Boolean(row.active),
  };
}

async function resolveUnit(trx: Knex.Transaction, code: string | null | undefined): Promise<number | null> {
  if (!code) return null;
  const unit = await unitIdByCode(trx, code);
  if (!unit)
    throw new ApiError(400, 'invalid_input', `There is no unit ${code}.`, { unitCode: `No unit with code ${code}` });
  return unit.id;
}

/** Queues a single-use set-password link (24 h) for the user; older open links stop working. */
async function queueLink(
  trx: Knex.Transaction,
  actorId: number,
  user: { id: number; email: string; name: string; unit_id: number | null },
  purpose: 'invite' | 'reset',
  now: Date,
) {
  await expireOpenLinks(trx, user.id, now);
  const token = randomBytes(32).toString('base64url');
  const expiresAt = new Date(now.getTime() + LINK_HOURS * 3_600_000);
  const linkId = await insertLink(trx, {
    user_id: user.id,
    token_hash: hashToken(token),
    purpose,
    created_by: actorId,
    created_at: now,
    expires_at: expiresAt,
  });
  const zone =
    (await unitZoneOf(trx, user.unit_id)) ?? (await trx('units').orderBy('id').first('time_zone'))?.time_zone ?? 'UTC';
  const hospital = (await trx('units').orderBy('id').first('hospital'))?.hospital ?? null;
  const mail = setPasswordMail({
    name: user.name,
    link: `${publicOrigin()}/set-password?token=${token}`,
    expiresAt,
    timeZone: zone,
    purpose,
    hospital,
  });
  await enqueueMail(trx, {
    idempotency_key: `password-link:${linkId}`,
    escalation_id: null,
    to_addresses: user.email,
    subject: mail.subject,
    text_body: mail.text,
    html_body: mail.html,
    created_at: now,
  });
  return { linkId, expiresAt };
}

export async function createStaff(actorId: number, input: CreateUserInput, now = new Date()) {
  try {
    return await withTransactionRetry(async (trx) => {
      const unitId = await resolveUnit(trx, input.unitCode);
      // No usable password until the person follows the link: a random secret nobody knows.
      const placeholder = await bcrypt.hash(randomBytes(24).toString('base64url'), 10);
      const id = await insertStaff(trx, {
        email: input.email,
        name: input.name,
        role: input.role,
        unit_id: unitId,
        password_hash: placeholder,
        created_at: now,
      });
      const link = await queueLink(
        trx,
        actorId,
        { id, email: input.email, name: input.name, unit_id: unitId },
        'invite',
        now,
      );
      const after = { email: input.email, name: input.name, role: input.role, unitCode: input.unitCode ?? null };
      await writeAudit(trx, { actorId, action: 'user.create', entity: 'user', entityId: id, after, at: now });
      await writeAudit(trx, {
        actorId,
        action: 'user.password_link',
        entity: 'user',
        entityId: id,
        after: { purpose: 'invite', linkId: link.linkId, expiresAt: link.expiresAt.toISOString() },
        at: now,
      });
      return { user: { id, ...after, active: true }, linkExpiresAt: link.expiresAt.toISOString() };
    });
  } catch (err) {
    if (isDuplicate(err))
      throw new ApiError(409, 'duplicate_email', `${input.email} already has an account.`, { email: 'Already in use' });
    throw err;
  }
}

/** Refuses to leave the hospital without an active administrator (409). */
function assertNotLastAdmin(admins: number[], user: StaffRow) {
  if (user.role !== 'admin' || !user.active) return;
  if (admins.length <= 1)
    throw new ApiError(409, 'last_admin', 'This is the last active administrator; make another administrator first.');
}

async function lockedOrMissing(trx: Knex.Transaction, id: number): Promise<StaffRow> {
  const user = await lockStaff(trx, id);
  if (!user) throw new ApiError(404, 'not_found', 'No user with that id.');
  return user;
}

export async function updateStaffMember(actorId: number, id: number, input: UpdateUserInput, now = new Date()) {
  return withTransactionRetry(async (trx) => {
    // Administrators' rows first, then the person's: one lock order for every writer, so two
    // administrators changing each other wait for one another instead of deadlocking.
    const admins = await lockActiveAdmins(trx);
    const before = await lockedOrMissing(trx, id);
    const role: Role = input.role ?? before.role;
    // A change of role alone to one without a unit drops the unit; other combinations must name it.
    const unitCode =
      input.unitCode !== undefined
        ? input.unitCode
        : input.role && (spansUnits(input.role) || input.role === 'admin')
          ? null
          : before.unit_code;
    const problem = unitRuleProblem(role, unitCode);
    if (problem) throw new ApiError(400, 'invalid_input', `unitCode: ${problem}.`, { unitCode: problem });
    if (before.role === 'admin' && role !== 'admin') assertNotLastAdmin(admins, before);
    const unitId = await resolveUnit(trx, unitCode);
    const name = input.name ?? before.name;
    await updateStaff(trx, id, { role, unit_id: unitId, name });
    const after = { name, role, unitCode: unitCode ?? null };
    await writeAudit(trx, {
      actorId,
      action: 'user.update',
      entity: 'user',
      entityId: id,
      before: { name: before.name, role: before.role, unitCode: before.unit_code },
      after,
      at: now,
    });
    return { user: { ...view(before), ...after } };
  });
}

export async function deactivateStaff(actorId: number, id: number, reason: string | undefined, now = new Date()) {
  const result = await withTransactionRetry(async (trx) => {
    const admins = await lockActiveAdmins(trx); // same lock order as updateStaffMember
    const before = await lockedOrMissing(trx, id);
    if (!before.active) return { user: view(before), changed: false };
    assertNotLastAdmin(admins, before);
    await updateStaff(trx, id, { active: false, deactivated_at: now });
    await expireOpenLinks(trx, id, now);
    await writeAudit(trx, {
      actorId,
      action: 'user.deactivate',
      entity: 'user',
      entityId: id,
      before: { active: true },
      after: { active: false, reason: reason ?? null },
      at: now,
    });
    return { user: { ...view(before), active: false }, changed: true };
  });
  if (result.changed) await endSessionsOf(id, 'deactivated');
  return { user: result.user };
}

export async function reactivateStaff(actorId: number, id: number, now = new Date()) {
  return withTransactionRetry(async (trx) => {
    const before = await lockedOrMissing(trx, id);
    if (before.active) return { user: view(before) };
    await updateStaff(trx, id, { active: true, deactivated_at: null, failed_signins: 0, locked_until: null });
    await writeAudit(trx, {
      actorId,
      action: 'user.reactivate',
      entity: 'user',
      entityId: id,
      before: { active: false },
      after: { active: true },
      at: now,
    });
    return { user: { ...view(before), active: true } };
  });
}

/** An admin reset: a new link by e-mail, and a password change forced at the next sign-in. */
export async function sendPasswordLink(actorId: number, id: number, now = new Date()) {
  return withTransactionRetry(async (trx) => {
    const user = await lockedOrMissing(trx, id);
    if (!user.active)
      throw new ApiError(409, 'inactive', 'This account is deactivated; reactivate it before sending a link.');
    const link = await queueLink(trx, actorId, user, 'reset', now);
    await updateStaff(trx, id, { must_change_password: true });
    await writeAudit(trx, {
      actorId,
      action: 'user.password_link',
      entity: 'user',
      entityId: id,
      after: { purpose: 'reset', linkId: link.linkId, expiresAt: link.expiresAt.toISOString() },
      at: now,
    });
    return { sent: true, to: user.email, linkExpiresAt: link.expiresAt.toISOString() };
  });
}
