/**
 * What a person may do with an escalation they can see, from the role groups and its state. Sent as
 * `can` with every escalation (islands show buttons by it, copying no rule) and checked again when
 * the claim or close arrives.
 */
import { CLAIMING_ROLES, CLOSING_ROLES, hasRole } from '~/lib/auth/roles.ts';
import type { EscalationCan } from '~/lib/escalations/api-types.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';

export function escalationPermissions(
  user: SessionUser,
  escalation: { state: 'raised' | 'claimed' | 'closed' },
): EscalationCan {
  return {
    claim: hasRole(user.role, CLAIMING_ROLES) && escalation.state === 'raised',
    close: hasRole(user.role, CLOSING_ROLES) && escalation.state !== 'closed',
  };
}
