import { and, asc, count, desc, eq, ilike, or, sql, type SQL } from 'drizzle-orm';
import type { z } from 'zod';
import { deriveSifTarget } from '../../shared/api/sif-target.js';
import type { Sif, sifListQuery } from '../../shared/api/sifs.js';
import type { Database } from '../db/client.js';
import { sifs, type NewSifRow, type SifRow } from '../db/schema/sifs.js';
import { users } from '../db/schema/users.js';
import type { ProjectAccess } from '../projects/project-access.js';

type SifListQuery = z.output<typeof sifListQuery>;
export type SifFields = Omit<NewSifRow, 'id' | 'projectId' | 'version' | 'createdAt' | 'updatedAt'>;

export function toSif(row: SifRow, ownerDisplayName: string): Sif {
  const target = { kind: row.targetKind, value: row.targetValue };
  const check = deriveSifTarget(target, row.demandMode);
  if (!check.ok) throw new Error(`stored SIF ${row.id} has a target that no longer validates: ${check.issue.message}`);
  return {
    id: row.id,
    projectId: row.projectId,
    tag: row.tag,
    title: row.title,
    hazardousEvent: row.hazardousEvent,
    demandMode: row.demandMode,
    target,
    derivedTarget: check.derived,
    demandRatePerYear: row.demandRatePerYear,
    missionHours: row.missionHours,
    status: row.status,
    ownerId: row.ownerId,
    ownerDisplayName,
    version: row.version,
    archived: row.archived,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

const SORT_COLUMNS = {
  tag: [sql`lower(${sifs.tag})`],
  title: [sql`lower(${sifs.title})`],
  demandMode: [sifs.demandMode],
  sil: [sifs.targetSil],
  status: [sifs.status],
  createdAt: [sifs.createdAt],
  updatedAt: [sifs.updatedAt],
} satisfies Record<SifListQuery['sort'], unknown[]>;

function likePattern(search: string): string {
  return `%${search.replace(/[\\%_]/g, (character) => `\\${character}`)}%`;
}

/** The SIFs of one project the user may see (built from a checked ProjectAccess). */
export class SifsRepository {
  private readonly projectId: string;

  constructor(
    private readonly db: Database,
    access: ProjectAccess,
  ) {
    this.projectId = access.project.id;
  }

  private inProject(...conditions: (SQL | undefined)[]): SQL | undefined {
    return and(eq(sifs.projectId, this.projectId), ...conditions);
  }

  async list(query: SifListQuery): Promise<{ items: Sif[]; total: number }> {
    const search = query.search ? likePattern(query.search) : undefined;
    const where = this.inProject(
      query.includeArchived ? undefined : eq(sifs.archived, false),
      query.status ? eq(sifs.status, query.status) : undefined,
      search ? or(ilike(sifs.tag, search), ilike(sifs.title, search), ilike(sifs.hazardousEvent, search)) : undefined,
    );
    const direction = query.order === 'asc' ? asc : desc;
    const [rows, [{ total }]] = await Promise.all([
      this.db
        .select({ row: sifs, ownerDisplayName: users.displayName })
        .from(sifs)
        .innerJoin(users, eq(users.id, sifs.ownerId))
        .where(where)
        .orderBy(...SORT_COLUMNS[query.sort].map((column) => direction(column)), asc(sql`lower(${sifs.tag})`), asc(sifs.id))
        .limit(query.pageSize)
        .offset((query.page - 1) * query.pageSize),
      this.db.select({ total: count() }).from(sifs).where(where),
    ]);
    return { items: rows.map(({ row, ownerDisplayName }) => toSif(row, ownerDisplayName)), total };
  }

  async find(sifId: string): Promise<Sif | null> {
    const [found] = await this.db
      .select({ row: sifs, ownerDisplayName: users.displayName })
      .from(sifs)
      .innerJoin(users, eq(users.id, sifs.ownerId))
      .where(this.inProject(eq(sifs.id, sifId)));
    return found ? toSif(found.row, found.ownerDisplayName) : null;
  }

  async insert(values: SifFields): Promise<string> {
    const [row] = await this.db
      .insert(sifs)
      .values({ ...values, projectId: this.projectId })
      .returning({ id: sifs.id });
    return row.id;
  }

  /** Applies the change only if the stored version is still `version`; false when someone saved first. */
  async updateIfVersion(sifId: string, version: number, values: Partial<SifFields>): Promise<boolean> {
    const updated = await this.db
      .update(sifs)
      .set({ ...values, version: sql`${sifs.version} + 1` })
      .where(this.inProject(eq(sifs.id, sifId), eq(sifs.version, version)))
      .returning({ id: sifs.id });
    return updated.length === 1;
  }
}
