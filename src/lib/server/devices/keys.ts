/**
 * Device keys: a gateway's credential for one bed. The key is shown once at creation; only its
 * SHA-256 is stored. Creation and revocation are audited in their transaction.
 */
import { toIso } from '~/lib/time/iso.ts';
import { createHash, randomBytes } from 'node:crypto';
import type { DeviceKeyView } from '~/lib/devices/api-types.ts';
import { ApiError } from '~/lib/server/http.ts';
import { revokeCredential } from '~/lib/server/credentials.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import type { IngestSource } from './ingest.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { findBed } from '~/lib/server/queries/patients.ts';
import {
  activeBeds,
  findDeviceKeyListRow,
  findKeyByHash,
  insertDeviceKey,
  listDeviceKeys,
  lockDeviceKey,
  revokeDeviceKey,
  touchDeviceKey,
  type DeviceKeyListRow,
} from '~/lib/server/queries/devices.ts';

const KEY_PREFIX = 'ebw_';

export function keyView(r: DeviceKeyListRow): DeviceKeyView {
  return {
    id: r.id,
    label: r.label,
    prefix: r.key_prefix,
    bed: { id: r.bed_id, label: r.bed_label, unitCode: r.unit_code, unitName: r.unit_name },
    createdAt: toIso(r.created_at)!,
    createdBy: r.created_by_name,
    lastUsedAt: toIso(r.last_used_at),
    revokedAt: toIso(r.revoked_at),
    revokedBy: r.revoked_by_name,
    revokeReason: r.revoke_reason,
  };
}

export function hashDeviceKey(key: string): string {
  return createHash('sha256').update(key, 'utf8').digest('hex');
}

/** 256 random bits; the prefix names the key in lists without making it usable. */
export function newDeviceKey(): { key: string; hash: string; prefix: string } {
  const key = KEY_PREFIX + randomBytes(32).toString('base64url');
  return { key, hash: hashDeviceKey(key), prefix: key.slice(0, KEY_PREFIX.length + 6) };
}

export async function listKeys() {
  const [keys, beds] = await Promise.all([listDeviceKeys(), activeBeds()]);
  return {
    keys: keys.map(keyView),
    beds: beds.map((b) => ({ id: b.id, label: b.label, unitCode: b.unit_code, unitName: b.unit_name })),
  };
}

/** Returns the key itself once; it cannot be read again. `actorId` is null for the demo feeder. */
export async function createDeviceKey(
  actorId: number | null,
  input: { bedId: number; label: string },
  now = new Date(),
): Promise<{ key: string; deviceKey: DeviceKeyView }> {
  const bed = await findBed(input.bedId);
  if (!bed?.active) throw new ApiError(400, 'invalid_input', 'That bed does not exist.', { bedId: 'No such bed' });
  const { key, hash, prefix } = newDeviceKey();
  const id = await withTransactionRetry(async (trx) => {
    const keyId = await insertDeviceKey(trx, {
      bed_id: bed.id,
      label: input.label,
      key_hash: hash,
      key_prefix: prefix,
      created_by: actorId,
      created_at: now,
    });
    await writeAudit(trx, {
      actorId,
      action: 'device_key.create',
      entity: 'device_key',
      entityId: keyId,
      after: { bedId: bed.id, bedLabel: bed.label, label: input.label, prefix },
      at: now,
    });
    return keyId;
  });
  return { key, deviceKey: keyView((await findDeviceKeyListRow(id))!) };
}

export async function revokeKey(
  actorId: number | null,
  id: number,
  reason: string,
  now = new Date(),
): Promise<DeviceKeyView> {
  await revokeCredential(
    { entity: 'device_key', noun: 'device key', shortNoun: 'key', lock: lockDeviceKey, revoke: revokeDeviceKey },
    actorId,
    id,
    reason,
    now,
  );
  return keyView((await findDeviceKeyListRow(id))!);
}

/** The key behind an `Authorization: Bearer …` header, or 401/403. */
export async function authenticateDeviceKey(authorization: string | null) {
  const m = /^Bearer\s+(\S+)\s*$/i.exec(authorization ?? '');
  if (!m) throw new ApiError(401, 'device_key_required', 'Send the device key as "Authorization: Bearer <key>".');
  const key = await findKeyByHash(hashDeviceKey(m[1]!));
  if (!key) throw new ApiError(401, 'invalid_device_key', 'This device key is not known.');
  if (key.revoked_at)
    throw new ApiError(401, 'device_key_revoked', 'This device key was revoked; ask an administrator for a new one.');
  if (!key.bed_active) throw new ApiError(403, 'bed_inactive', `Bed ${key.bed_label} is no longer in use.`);
  return key;
}

/** The feed's source for a key: its bed, and its "last used" stamp written with the readings. */
export function deviceKeySource(key: Awaited<ReturnType<typeof authenticateDeviceKey>>): IngestSource {
  return { bed_id: key.bed_id, bed_label: key.bed_label, touch: (trx, at) => touchDeviceKey(trx, key.id, at) };
}
