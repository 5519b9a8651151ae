import type { Role } from '../../shared/roles.js';

/** Who asked for a queue operation: a signed-in user, or a node acting by itself. */
export type Actor =
  | { kind: 'user'; userId: number; role: Role; email: string }
  | { kind: 'node'; nodeId: string };

export function actorLabel(actor: Actor): string {
  return actor.kind === 'user' ? `user:${actor.userId} ${actor.email}` : `node:${actor.nodeId}`;
}

export const actorUserId = (actor: Actor): number | null => (actor.kind === 'user' ? actor.userId : null);
