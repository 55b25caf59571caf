import { deriveSifTarget } from '../../../shared/api/sif-target.js';
import { sif, type Sif, type SifPage } from '../../../shared/api/sifs.js';
import { project, type Project } from '../../../shared/api/projects.js';
import { user, type User } from '../../../shared/api/users.js';

// Invented records for the specs; each passes through the shared schema so a spec cannot feed the
// client a shape the server would never send.

export const PROJECT_ID = '0b7c6a52-2f1e-4c55-9d3a-6f1b8e0c4a01';
export const OWNER_ID = '5d1f0c9e-8a7b-4e3d-9c2b-1a0f9e8d7c02';

export function aUser(overrides: Partial<User> = {}): User {
  return user.parse({
    id: OWNER_ID,
    username: 'mira.okafor',
    displayName: 'Mira Okafor',
    isAdmin: false,
    disabled: false,
    ...overrides,
  });
}

export function aProject(overrides: Partial<Project> = {}): Project {
  return project.parse({
    id: PROJECT_ID,
    name: 'Harrowgate Ammonia Unit 3',
    description: 'Invented plant for the specs.',
    site: 'Harrowgate',
    unit: 'Unit 3',
    client: '',
    archived: false,
    myRole: 'engineer',
    createdAt: '2026-11-01T08:00:00.000Z',
    updatedAt: '2026-11-01T08:00:00.000Z',
    ...overrides,
  });
}

let serial = 0;

export function aSif(overrides: Partial<Omit<Sif, 'derivedTarget'>> = {}): Sif {
  serial += 1;
  const demandMode = overrides.demandMode ?? 'low';
  const target = overrides.target ?? { kind: 'sil' as const, value: 2 };
  const check = deriveSifTarget(target, demandMode);
  if (!check.ok) throw new Error(`fixture target does not fit: ${check.issue.message}`);
  return sif.parse({
    id: `7e3a1c5b-0d2f-4a6e-8b9c-${String(serial).padStart(12, '0')}`,
    projectId: PROJECT_ID,
    tag: `HS-${300 + serial}`,
    title: `Reactor R-30${serial} high-temperature trip`,
    hazardousEvent: 'Runaway reaction in the reactor, overpressure and release.',
    demandMode,
    target,
    derivedTarget: check.derived,
    demandRatePerYear: 0.1,
    missionHours: 87_600,
    status: 'draft',
    ownerId: OWNER_ID,
    ownerDisplayName: 'Mira Okafor',
    version: 1,
    archived: false,
    createdAt: '2026-11-02T08:00:00.000Z',
    updatedAt: '2026-11-03T09:30:00.000Z',
    ...overrides,
  });
}

export function aPage(items: Sif[], total = items.length, page = 1, pageSize = 25): SifPage {
  return { items, total, page, pageSize };
}
