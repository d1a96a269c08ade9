/**
 * Who may push and pull. A push writes rounds on the sites of their route versions: the caller
 * needs one of PUSH_ROLES there. A round already stored may be written again (its readings,
 * answers, photos) by its own technician or a site admin. Pull: any member of the site.
 */
import type { EntityManager } from 'typeorm';
import type { Role } from '../../shared/api/auth';
import { MembershipEntity } from '../entities';
import { AppError } from '../errors';

/** Roles that walk rounds and push them (planners triage work orders and do not). */
export const PUSH_ROLES: readonly Role[] = ['technician', 'engineer', 'admin'];

export async function rolesOf(em: EntityManager, userId: string, siteIds: string[]): Promise<Map<string, Role>> {
  if (siteIds.length === 0) return new Map();
  const rows = await em
    .getRepository(MembershipEntity)
    .createQueryBuilder('m')
    .where('m.userId = :userId', { userId })
    .andWhere('m.siteId IN (:...siteIds)', { siteIds })
    .getMany();
  return new Map(rows.map((m) => [m.siteId, m.role]));
}

export function assertMayPush(role: Role | undefined, what: string): void {
  if (!role) throw new AppError(403, 'forbidden', `${what} is on a site you are not a member of`);
  if (!PUSH_ROLES.includes(role)) {
    throw new AppError(403, 'forbidden', `${what}: pushing rounds needs the role ${PUSH_ROLES.join(', ')} on its site; you are ${role}`);
  }
}

export function mayWriteRound(round: { technicianId: string }, userId: string, role: Role | undefined): boolean {
  return !!role && PUSH_ROLES.includes(role) && (round.technicianId === userId || role === 'admin');
}
