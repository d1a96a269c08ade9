/**
 * Who may push and pull. A push writes rounds on the sites of their route versions: the caller
 * needs one of PUSH_ROLES there. A round already stored may be written again (its readings,
 * answers, photos) by its own technician or a site admin. Pull: any member of the site.
 */
import type { Role } from '../../shared/api/auth';
import { AppError } from '../errors';

/** Roles that walk rounds and push them (planners triage work orders and do not). */
export const PUSH_ROLES: readonly Role[] = ['technician', 'engineer', 'admin'];

export function assertMayPush(role: Role | undefined, what: string): void {
  // push.ts looks ids up on the caller's own sites only, so a role is always there; kept as a backstop
  if (!role) throw new AppError(403, 'forbidden', `${what}: pushing rounds needs a membership of its site`);
  if (!PUSH_ROLES.includes(role)) {
    throw new AppError(
      403,
      'forbidden',
      `${what}: pushing rounds needs the role ${PUSH_ROLES.join(', ')} on its site; you are ${role}`,
    );
  }
}

export function mayWriteRound(round: { technicianId: string }, userId: string, role: Role | undefined): boolean {
  return !!role && PUSH_ROLES.includes(role) && (round.technicianId === userId || role === 'admin');
}
