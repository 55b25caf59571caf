import type { Member, ProjectRole } from '../../shared/api/projects.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import { apiErrors } from '../errors.js';
import { loadProjectAccess, requireAction, requireActiveProject, type ProjectAccess } from '../projects/project-access.js';
import { recordAudit } from '../audit/audit-trail.js';
import { UsersRepository } from '../users/users-repository.js';
import { MembersRepository } from './members-repository.js';

/** Membership rules: leads (and site admins) manage members; a project always keeps a lead. */
export class MembersService {
  constructor(
    private readonly db: Database,
    private readonly user: SessionUser,
  ) {}

  async list(projectId: string): Promise<Member[]> {
    const access = await loadProjectAccess(this.db, this.user, projectId);
    return new MembersRepository(this.db, access).list();
  }

  async put(projectId: string, userId: string, role: ProjectRole): Promise<Member> {
    const access = await this.managedProject(projectId);
    const target = await new UsersRepository(this.db).findById(userId);
    if (!target) throw apiErrors.notFound('no user with this id');
    const previous = await this.db.transaction(async (tx) => {
      const members = new MembersRepository(tx, access);
      await members.lockProject();
      const existing = await members.find(userId);
      if (!existing && target.disabled) throw apiErrors.conflict(`${target.username} is disabled and cannot join a project`);
      if (existing?.role === 'lead' && role !== 'lead') await this.keepALead(members);
      await members.upsert(userId, role);
      return existing?.role ?? null;
    });
    if (previous !== role) {
      await recordAudit(this.db, { projectId, actor: this.user, action: 'member.role-changed', summary: `${target.username}: ${previous ?? 'not a member'} -> ${role}`, details: { userId, from: previous, to: role } });
    }
    return { userId: target.id, username: target.username, displayName: target.displayName, role };
  }

  async remove(projectId: string, userId: string): Promise<void> {
    const access = await this.managedProject(projectId);
    await this.db.transaction(async (tx) => {
      const members = new MembersRepository(tx, access);
      await members.lockProject();
      const existing = await members.find(userId);
      if (!existing) throw apiErrors.notFound('this user is not a member of the project');
      if (existing.role === 'lead') await this.keepALead(members);
      await members.remove(userId);
      return existing.role;
    }).then((role) => recordAudit(this.db, { projectId, actor: this.user, action: 'member.removed', summary: `removed a ${role} from the project`, details: { userId, from: role } }));
  }

  private async managedProject(projectId: string): Promise<ProjectAccess> {
    const access = await loadProjectAccess(this.db, this.user, projectId);
    requireAction(access, 'members.manage', 'manage members');
    requireActiveProject(access);
    return access;
  }

  private async keepALead(members: MembersRepository): Promise<void> {
    if ((await members.countLeads()) <= 1) {
      throw apiErrors.conflict('a project needs at least one lead; make another member lead first');
    }
  }
}
