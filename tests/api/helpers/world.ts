import { hashPassword } from '../../../server/auth/passwords.js';
import type { Database } from '../../../server/db/client.js';
import { projectMembers, projects } from '../../../server/db/schema/projects.js';
import { sifs } from '../../../server/db/schema/sifs.js';
import { users } from '../../../server/db/schema/users.js';

/**
 * A small fixed world for API tests: project A with one member per role, project B led by an outsider
 * (isolation), and SIFs in each. Fixture hashes use a low scrypt cost (N = 2^10) so the many sign-ins stay
 * fast; verification reads the cost from the hash, the same code path as production hashes.
 */
export const WORLD_USERNAMES = ['admin', 'lead', 'engineer', 'reviewer', 'viewer', 'outsider'] as const;
export type WorldUsername = (typeof WORLD_USERNAMES)[number];

export const passwordOf = (username: string) => `${username}-password-1`;

export interface World {
  readonly userId: Record<WorldUsername, string>;
  readonly projectA: string;
  readonly projectB: string;
  /** SIFs of project A by status, and one of project B. */
  readonly sifDraft: string;
  readonly sifInReview: string;
  readonly sifApproved: string;
  readonly sifOfB: string;
}

const FIXTURE_COST = { N: 2 ** 10, r: 8, p: 1 };
const hashCache = new Map<string, Promise<string>>();

export function fixtureHash(password: string): Promise<string> {
  let hash = hashCache.get(password);
  if (!hash) {
    hash = hashPassword(password, FIXTURE_COST);
    hashCache.set(password, hash);
  }
  return hash;
}

export const SIF_FIELDS = {
  title: 'Separator high-pressure shutdown',
  hazardousEvent: 'Overpressure of the separator and loss of containment.',
  demandMode: 'low' as const,
  targetKind: 'sil' as const,
  targetValue: 2,
  targetSil: 2,
  demandRatePerYear: 0.1,
  missionHours: 87_600,
};

export async function seedWorld(db: Database): Promise<World> {
  const rows = await db
    .insert(users)
    .values(
      await Promise.all(
        WORLD_USERNAMES.map(async (username) => ({
          username,
          displayName: `${username[0].toUpperCase()}${username.slice(1)} (test)`,
          isAdmin: username === 'admin',
          passwordHash: await fixtureHash(passwordOf(username)),
        })),
      ),
    )
    .returning();
  const userId = Object.fromEntries(rows.map((row) => [row.username, row.id])) as Record<WorldUsername, string>;
  const [a, b] = await db
    .insert(projects)
    .values([
      { name: 'Project A', site: 'Test site', unit: 'Unit 1', client: 'Test client' },
      { name: 'Project B', site: 'Other site' },
    ])
    .returning();
  await db.insert(projectMembers).values([
    { projectId: a.id, userId: userId.lead, role: 'lead' },
    { projectId: a.id, userId: userId.engineer, role: 'engineer' },
    { projectId: a.id, userId: userId.reviewer, role: 'reviewer' },
    { projectId: a.id, userId: userId.viewer, role: 'viewer' },
    { projectId: b.id, userId: userId.outsider, role: 'lead' },
  ]);
  const [draft, inReview, approved, ofB] = await db
    .insert(sifs)
    .values([
      { ...SIF_FIELDS, projectId: a.id, tag: 'PZT-1101', status: 'draft', ownerId: userId.engineer },
      { ...SIF_FIELDS, projectId: a.id, tag: 'LZT-1204', status: 'in-review', ownerId: userId.engineer },
      { ...SIF_FIELDS, projectId: a.id, tag: 'TZT-1310', status: 'approved', ownerId: userId.lead },
      { ...SIF_FIELDS, projectId: b.id, tag: 'PZT-9001', status: 'draft', ownerId: userId.outsider },
    ])
    .returning();
  return {
    userId,
    projectA: a.id,
    projectB: b.id,
    sifDraft: draft.id,
    sifInReview: inReview.id,
    sifApproved: approved.id,
    sifOfB: ofB.id,
  };
}
