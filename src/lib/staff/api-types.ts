/** JSON shapes of the admin staff, units and audit APIs, as the islands read them. */
import type { Role } from '~/lib/auth/roles.ts';

export interface StaffListItem {
  id: number;
  email: string;
  name: string;
  role: Role;
  unit_code: string | null;
  active: boolean;
  failed_signins: number;
  locked_until: string | null;
  last_signin_at: string | null;
  must_change_password: boolean;
  password_changed_at: string | null;
  deactivated_at: string | null;
  created_at: string;
}

export interface AdminBed {
  id: number;
  label: string;
  position: number;
  active: boolean;
  retiredAt: string | null;
  occupied: boolean;
}
export interface AdminUnit {
  id: number;
  code: string;
  name: string;
  hospital: string;
  timeZone: string;
  beds: AdminBed[];
}
