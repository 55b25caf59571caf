import type { DeviceFieldsInput } from '../../shared/api/devices.js';
import type { Database } from '../../server/db/client.js';
import { users } from '../../server/db/schema/users.js';
import { fixtureHash, passwordOf } from './helpers/world.js';

/** An invented pressure transmitter (fictional maker); rates per hour. */
export function transmitterFields(overrides: Partial<DeviceFieldsInput> = {}): DeviceFieldsInput {
  return {
    maker: 'Quillfen Instruments (fictional)',
    model: 'QP-400 pressure transmitter',
    category: 'transmitter',
    description: 'Smart pressure transmitter, 4-20 mA.',
    lambdaDU: 4.0e-8,
    lambdaDD: 3.6e-7,
    lambdaSU: 1.0e-7,
    lambdaSD: 2.0e-7,
    architectureType: 'B',
    hardwareFaultTolerance: 0,
    systematicCapability: 2,
    proofTestCoverage: 0.9,
    usefulLifeYears: 15,
    sourceKind: 'assessment-report',
    sourceReference: 'Report QF-2026-014 (invented)',
    validUntil: '2029-06-30',
    ...overrides,
  };
}

/** A signed-in user who belongs to no project (and is no admin). */
export async function addUserWithoutProject(db: Database, username = 'loner'): Promise<string> {
  const [row] = await db
    .insert(users)
    .values({ username, displayName: 'Loner (test)', isAdmin: false, passwordHash: await fixtureHash(passwordOf(username)) })
    .returning({ id: users.id });
  return row!.id;
}

/** Smallest valid-looking files of each kind: only their first bytes matter to the type check. */
export const PDF_BYTES = Buffer.concat([Buffer.from('%PDF-1.7\n%invented certificate\n'), Buffer.alloc(200, 0x20), Buffer.from('\n%%EOF\n')]);
export const PNG_BYTES = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52]);
