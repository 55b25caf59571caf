import type { CreateSifBody } from '../../shared/api/sifs.js';
import type { ProjectRole } from '../../shared/api/projects.js';
import { deriveSifTarget } from '../../shared/api/sif-target.js';
import { hashPassword } from '../auth/passwords.js';
import type { Database } from '../db/client.js';
import { projectMembers, projects } from '../db/schema/projects.js';
import { sifs } from '../db/schema/sifs.js';
import { users } from '../db/schema/users.js';
import { seedDemoModel } from './demo-model.js';
import { seedDemoDevices } from './demo-devices.js';
import type { SifStatus } from '../../shared/api/sifs.js';

/**
 * The demo workspace: an invented gas terminal ("Brackwater Point Gas Terminal", operated for the
 * invented "Tessaly Midstream"), its tags and figures all fictional. Seeded only into an empty database.
 */
export interface DemoUser {
  readonly username: string;
  readonly displayName: string;
  readonly password: string;
  readonly isAdmin: boolean;
  /** Role in the main demo project, if any. */
  readonly role: ProjectRole | null;
}

export const DEMO_USERS: readonly DemoUser[] = [
  { username: 'admin', displayName: 'Site Admin (demo)', password: 'proofline-admin', isAdmin: true, role: null },
  { username: 'lead', displayName: 'Lena Lead (demo)', password: 'proofline-lead', isAdmin: false, role: 'lead' },
  { username: 'engineer', displayName: 'Ezra Engineer (demo)', password: 'proofline-engineer', isAdmin: false, role: 'engineer' },
  { username: 'reviewer', displayName: 'Rhea Reviewer (demo)', password: 'proofline-reviewer', isAdmin: false, role: 'reviewer' },
  { username: 'viewer', displayName: 'Vik Viewer (demo)', password: 'proofline-viewer', isAdmin: false, role: 'viewer' },
];

type DemoSif = Omit<CreateSifBody, 'ownerId'> & { status: SifStatus; owner: 'lead' | 'engineer' };

const TEN_YEARS = 87_600;

const TERMINAL_SIFS: readonly DemoSif[] = [
  {
    tag: 'PZT-1101',
    title: 'Inlet separator V-110 high-pressure shutdown',
    hazardousEvent: 'Overpressure of inlet separator V-110 after a blocked gas outlet, vessel rupture and jet fire.',
    demandMode: 'low',
    target: { kind: 'sil', value: 2 },
    demandRatePerYear: 0.1,
    missionHours: TEN_YEARS,
    status: 'approved',
    owner: 'engineer',
  },
  {
    tag: 'LZT-1204',
    title: 'Slug catcher V-120 high-high liquid level trip',
    hazardousEvent: 'Liquid carry-over from slug catcher V-120 into compressor K-130 suction, machine damage and gas release.',
    demandMode: 'low',
    target: { kind: 'rrf', value: 300 },
    demandRatePerYear: 0.2,
    missionHours: TEN_YEARS,
    status: 'in-review',
    owner: 'engineer',
  },
  {
    tag: 'TZT-1310',
    title: 'Compressor K-130 discharge high temperature trip',
    hazardousEvent: 'Discharge temperature above the cooler design limit, seal failure and gas release in the compressor house.',
    demandMode: 'low',
    target: { kind: 'pfdAvg', value: 5e-3 },
    demandRatePerYear: 0.5,
    missionHours: TEN_YEARS,
    status: 'draft',
    owner: 'engineer',
  },
  {
    tag: 'PZT-1402',
    title: 'Export pipeline overpressure protection (HIPPS)',
    hazardousEvent: 'Export pipeline pressure above its maximum allowable operating pressure, pipeline rupture.',
    demandMode: 'low',
    target: { kind: 'pfdAvg', value: 5e-4 },
    demandRatePerYear: 0.05,
    missionHours: 20 * 8_760,
    status: 'draft',
    owner: 'lead',
  },
  {
    tag: 'BZS-1505',
    title: 'Fired heater H-150 flame failure fuel cut-off',
    hazardousEvent: 'Loss of flame with fuel gas still flowing into firebox H-150, explosive mixture and firebox explosion.',
    demandMode: 'high',
    target: { kind: 'pfh', value: 3e-7 },
    demandRatePerYear: 12,
    missionHours: TEN_YEARS,
    status: 'approved',
    owner: 'engineer',
  },
  {
    tag: 'XZS-1601',
    title: 'Loading arm LA-160 emergency release interlock',
    hazardousEvent: 'Loading arm moves outside its envelope during transfer, hose rupture and liquid gas spill on the jetty.',
    demandMode: 'high',
    target: { kind: 'sil', value: 2 },
    demandRatePerYear: 4,
    missionHours: TEN_YEARS,
    status: 'draft',
    owner: 'engineer',
  },
  {
    tag: 'SZT-1702',
    title: 'Boil-off gas blower K-170 overspeed protection',
    hazardousEvent: 'Blower runs above its mechanical speed limit, impeller burst and gas release.',
    demandMode: 'continuous',
    target: { kind: 'sil', value: 1 },
    demandRatePerYear: null,
    missionHours: TEN_YEARS,
    status: 'in-review',
    owner: 'lead',
  },
  {
    tag: 'PZT-1101-OLD',
    title: 'Inlet separator V-110 high-pressure shutdown (first issue, 1oo1 transmitter)',
    hazardousEvent: 'Overpressure of inlet separator V-110 after a blocked gas outlet, vessel rupture and jet fire.',
    demandMode: 'low',
    target: { kind: 'rrf', value: 50 },
    demandRatePerYear: 0.1,
    missionHours: TEN_YEARS,
    status: 'superseded',
    owner: 'engineer',
  },
];

const FUEL_GAS_SIFS: readonly DemoSif[] = [
  {
    tag: 'PZT-2101',
    title: 'Fuel gas skid low-pressure shutdown',
    hazardousEvent: 'Fuel gas pressure too low for stable combustion at the gas turbine, flame-out and re-light of a gas cloud.',
    demandMode: 'low',
    target: { kind: 'sil', value: 1 },
    demandRatePerYear: 0.3,
    missionHours: TEN_YEARS,
    status: 'draft',
    owner: 'lead',
  },
];

/** Inserts the demo users, two projects and their SIFs in one transaction, unless any user exists. */
export async function seedDemoWorkspace(db: Database): Promise<boolean> {
  const hashes = await Promise.all(DEMO_USERS.map((user) => hashPassword(user.password)));
  return db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: users.id }).from(users).limit(1);
    if (existing) return false;
    const created = await tx
      .insert(users)
      .values(DEMO_USERS.map((user, index) => ({ username: user.username, displayName: user.displayName, isAdmin: user.isAdmin, passwordHash: hashes[index] })))
      .returning();
    const idOf = (username: string) => {
      const user = created.find((row) => row.username === username);
      if (!user) throw new Error(`demo user ${username} missing`);
      return user.id;
    };

    const [terminal, fuelGas] = await tx
      .insert(projects)
      .values([
        {
          name: 'Brackwater Point Gas Terminal: export compression',
          description: 'SIF register of the export compression train and the export pipeline (demo data, invented).',
          site: 'Brackwater Point',
          unit: 'Unit 100, export compression',
          client: 'Tessaly Midstream (invented)',
        },
        {
          name: 'Brackwater Point Gas Terminal: fuel gas skid',
          description: 'A second project the demo viewer is not a member of (demo data, invented).',
          site: 'Brackwater Point',
          unit: 'Unit 200, fuel gas',
          client: 'Tessaly Midstream (invented)',
        },
      ])
      .returning();

    await tx.insert(projectMembers).values([
      ...DEMO_USERS.filter((user) => user.role !== null).map((user) => ({ projectId: terminal.id, userId: idOf(user.username), role: user.role as ProjectRole })),
      { projectId: fuelGas.id, userId: idOf('lead'), role: 'lead' as const },
      { projectId: fuelGas.id, userId: idOf('engineer'), role: 'engineer' as const },
    ]);

    const rows = [
      ...TERMINAL_SIFS.map((sif) => ({ sif, projectId: terminal.id })),
      ...FUEL_GAS_SIFS.map((sif) => ({ sif, projectId: fuelGas.id })),
    ].map(({ sif, projectId }) => {
      const check = deriveSifTarget(sif.target, sif.demandMode);
      if (!check.ok) throw new Error(`demo SIF ${sif.tag}: ${check.issue.message}`);
      return {
        projectId,
        tag: sif.tag,
        title: sif.title,
        hazardousEvent: sif.hazardousEvent,
        demandMode: sif.demandMode,
        targetKind: sif.target.kind,
        targetValue: sif.target.value,
        targetSil: check.derived.sil,
        demandRatePerYear: sif.demandRatePerYear ?? null,
        missionHours: sif.missionHours,
        status: sif.status,
        ownerId: idOf(sif.owner),
      };
    });
    await tx.insert(sifs).values(rows);
    await seedDemoModel(tx);
    await seedDemoDevices(tx, idOf('engineer'));
    return true;
  });
}
