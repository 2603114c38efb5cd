// Who may change what, the one rule for app pages and the server's role checks (server/utils/access.ts):
// a lead or designer edits designs, tables, runs and sweeps; a viewer reads.
import type { RoleName } from '../types/account'

export const EDITOR_ROLES: readonly RoleName[] = ['lead', 'designer']

/** True for a role that may edit (lead, designer); false for a viewer, no role or an unknown one. */
export function roleCanEdit(role: string | null | undefined): boolean {
  return (EDITOR_ROLES as readonly string[]).includes(role ?? '')
}
