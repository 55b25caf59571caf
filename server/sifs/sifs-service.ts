import { and, eq, isNotNull } from 'drizzle-orm';
import type { z } from 'zod';
import { FROZEN_SIF_STATUSES, SIF_STATUS_TRANSITIONS, canChangeStatus } from '../../shared/api/permissions.js';
import { deriveSifTarget, sifRequirementIssues, type SifTarget } from '../../shared/api/sif-target.js';
import type { Sif, SifPage, SifStatus, createSifBody, sifListQuery, updateSifBody } from '../../shared/api/sifs.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import { uniqueViolation } from '../db/client.js';
import { models } from '../db/schema/models.js';
import { apiErrors } from '../errors.js';
import { MembersRepository } from '../members/members-repository.js';
import { can, loadProjectAccess, requireAction, requireActiveProject, roleForbids, type ProjectAccess } from '../projects/project-access.js';
import { SifsRepository, type SifFields } from './sifs-repository.js';

type CreateSif = z.output<typeof createSifBody>;
type UpdateSif = z.output<typeof updateSifBody>;
type SifListQuery = z.output<typeof sifListQuery>;

/** Fields whose change is a change of the record's content (frozen while approved or superseded). */
const CONTENT_FIELDS = ['tag', 'title', 'hazardousEvent', 'demandMode', 'target', 'demandRatePerYear', 'missionHours'] as const;

function sameTarget(a: SifTarget, b: SifTarget): boolean {
  return a.kind === b.kind && a.value === b.value;
}

function targetColumns(target: SifTarget, demandMode: Sif['demandMode']): Pick<SifFields, 'targetKind' | 'targetValue' | 'targetSil'> {
  const check = deriveSifTarget(target, demandMode);
  if (!check.ok) throw apiErrors.invalidField(check.issue.path, check.issue.message);
  return { targetKind: target.kind, targetValue: target.value, targetSil: check.derived.sil };
}

/**
 * Register rules: leads and engineers create and edit SIFs, reviewers move them through review, the
 * target always fits the demand mode, and a stale save is refused with the stored record (409).
 */
export class SifsService {
  constructor(
    private readonly db: Database,
    private readonly user: SessionUser,
  ) {}

  private async open(projectId: string): Promise<{ access: ProjectAccess; sifs: SifsRepository }> {
    const access = await loadProjectAccess(this.db, this.user, projectId);
    return { access, sifs: new SifsRepository(this.db, access) };
  }

  private async existing(sifs: SifsRepository, sifId: string): Promise<Sif> {
    const sif = await sifs.find(sifId);
    if (!sif) throw apiErrors.notFound('no SIF with this id in this project');
    return sif;
  }

  async list(projectId: string, query: SifListQuery): Promise<SifPage> {
    const { sifs } = await this.open(projectId);
    const { items, total } = await sifs.list(query);
    return { items, total, page: query.page, pageSize: query.pageSize };
  }

  async get(projectId: string, sifId: string): Promise<Sif> {
    const { sifs } = await this.open(projectId);
    return this.existing(sifs, sifId);
  }

  async create(projectId: string, body: CreateSif): Promise<Sif> {
    const { access, sifs } = await this.open(projectId);
    requireAction(access, 'sif.create', 'create SIFs');
    requireActiveProject(access);
    const ownerId = body.ownerId ?? this.user.id;
    await this.requireOwner(access, ownerId);
    const id = await this.saving(body.tag, () =>
      sifs.insert({
        tag: body.tag,
        title: body.title,
        hazardousEvent: body.hazardousEvent,
        demandMode: body.demandMode,
        ...targetColumns(body.target, body.demandMode),
        demandRatePerYear: body.demandRatePerYear,
        missionHours: body.missionHours,
        status: 'draft',
        ownerId,
        archived: false,
      }),
    );
    return this.existing(sifs, id);
  }

  async update(projectId: string, sifId: string, body: UpdateSif): Promise<Sif> {
    const { access, sifs } = await this.open(projectId);
    const current = await this.existing(sifs, sifId);
    const { version, status, ...fields } = body;
    const editsFields = Object.values(fields).some((value) => value !== undefined);
    if (editsFields) requireAction(access, 'sif.edit', 'edit SIFs');
    if (!can(access, 'sif.edit') && !can(access, 'sif.review')) requireAction(access, 'sif.edit', 'change SIFs');
    requireActiveProject(access);
    if (current.archived) throw apiErrors.conflict(`SIF ${current.tag} is archived; restore it before changing it`);
    if (version !== current.version) {
      throw apiErrors.versionConflict(
        `SIF ${current.tag} was changed by someone else (your version ${version}, stored version ${current.version}); compare and save again`,
        current,
      );
    }

    const nextStatus = status ?? current.status;
    this.checkStatusChange(access, current.status, nextStatus);
    if (nextStatus === 'approved' && current.status !== 'approved') await this.refuseApprovalOfIssuedModels(current.tag, sifId);

    const merged = {
      tag: fields.tag ?? current.tag,
      title: fields.title ?? current.title,
      hazardousEvent: fields.hazardousEvent ?? current.hazardousEvent,
      demandMode: fields.demandMode ?? current.demandMode,
      target: fields.target ?? current.target,
      demandRatePerYear: fields.demandRatePerYear === undefined ? current.demandRatePerYear : fields.demandRatePerYear,
      missionHours: fields.missionHours ?? current.missionHours,
    };
    const contentChanged = CONTENT_FIELDS.some((key) =>
      key === 'target' ? !sameTarget(merged.target, current.target) : merged[key] !== current[key],
    );
    if (contentChanged && FROZEN_SIF_STATUSES.includes(nextStatus)) {
      throw apiErrors.conflict(
        `SIF ${current.tag} is ${nextStatus}; set its status to draft (in the same save) to change its content`,
      );
    }
    const issues = sifRequirementIssues(merged);
    if (issues.length > 0) throw apiErrors.validation(issues);
    if (fields.ownerId !== undefined && fields.ownerId !== current.ownerId) await this.requireOwner(access, fields.ownerId);

    const saved = await this.saving(merged.tag, () =>
      sifs.updateIfVersion(sifId, version, {
        tag: merged.tag,
        title: merged.title,
        hazardousEvent: merged.hazardousEvent,
        demandMode: merged.demandMode,
        ...targetColumns(merged.target, merged.demandMode),
        demandRatePerYear: merged.demandRatePerYear,
        missionHours: merged.missionHours,
        status: nextStatus,
        ownerId: fields.ownerId ?? current.ownerId,
      }),
    );
    if (!saved) {
      const stored = await this.existing(sifs, sifId);
      throw apiErrors.versionConflict(`SIF ${stored.tag} was changed by someone else while you saved; compare and save again`, stored);
    }
    return this.existing(sifs, sifId);
  }

  async setArchived(projectId: string, sifId: string, archived: boolean): Promise<Sif> {
    const { access, sifs } = await this.open(projectId);
    requireAction(access, 'sif.archive', archived ? 'archive SIFs' : 'restore SIFs');
    requireActiveProject(access);
    const current = await this.existing(sifs, sifId);
    if (current.archived !== archived) await sifs.updateIfVersion(sifId, current.version, { archived });
    return this.existing(sifs, sifId);
  }

  private checkStatusChange(access: ProjectAccess, from: SifStatus, to: SifStatus): void {
    if (canChangeStatus(access.role, this.user.isAdmin, from, to)) return;
    const exists = SIF_STATUS_TRANSITIONS.some((transition) => transition.from === from && transition.to === to);
    if (exists) throw roleForbids(access, `change the status from ${from} to ${to}`);
    const allowed = SIF_STATUS_TRANSITIONS.filter((transition) => transition.from === from).map((transition) => transition.to);
    throw apiErrors.invalidField('status', `cannot change from ${from} to ${to}; from ${from} it may go to ${[...new Set(allowed)].join(', ')}`);
  }

  /**
   * A SIF whose model has an issued revision is approved only by a review round on that revision, where the
   * chosen reviewer decides and the revision's authors may not; setting the status here would skip both.
   */
  private async refuseApprovalOfIssuedModels(tag: string, sifId: string): Promise<void> {
    const [issued] = await this.db
      .select({ name: models.name })
      .from(models)
      .where(and(eq(models.sifId, sifId), isNotNull(models.latestRevision)))
      .limit(1);
    if (issued) {
      throw apiErrors.conflict(`SIF ${tag} has an issued revision of model "${issued.name}": it is approved through a review round of that revision (the model's Review panel), not by setting its status`);
    }
  }

  /** The owner must be a lead or engineer of the project: the person who answers for the record. */
  private async requireOwner(access: ProjectAccess, ownerId: string): Promise<void> {
    const member = await new MembersRepository(this.db, access).find(ownerId);
    if (!member || (member.role !== 'lead' && member.role !== 'engineer')) {
      throw apiErrors.invalidField('ownerId', 'must be a lead or engineer of this project');
    }
  }

  /** Runs a write, turning a duplicate tag into a 409 that names the field. */
  private async saving<Result>(tag: string, write: () => Promise<Result>): Promise<Result> {
    try {
      return await write();
    } catch (error) {
      if (uniqueViolation(error) === 'sifs_project_tag_unique') {
        throw apiErrors.alreadyExists('tag', `"${tag}" is already used by another SIF in this project`);
      }
      throw error;
    }
  }
}
