/** JSON shape of the admin device-key API, shared with the admin island. */
export interface DeviceKeyView {
  id: number;
  label: string;
  prefix: string;
  bed: { id: number; label: string; unitCode: string; unitName: string };
  createdAt: string;
  createdBy: string | null;
  lastUsedAt: string | null;
  revokedAt: string | null;
  revokedBy: string | null;
  revokeReason: string | null;
}
