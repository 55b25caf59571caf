import type { z } from 'zod';
import type { User, createUserBody, updateUserBody } from '../../shared/api/users.js';
import { hashPassword } from '../auth/passwords.js';
import type { SessionUser } from '../auth/session-user.js';
import { SessionsRepository } from '../auth/sessions-repository.js';
import { uniqueViolation, type Database } from '../db/client.js';
import { apiErrors } from '../errors.js';
import { UsersRepository } from './users-repository.js';

type CreateUser = z.output<typeof createUserBody>;
type UpdateUser = z.output<typeof updateUserBody>;

/** Account rules: admins create and change accounts, and cannot lock the site out of administration. */
export class UsersService {
  private readonly users: UsersRepository;
  private readonly sessions: SessionsRepository;

  constructor(db: Database, private readonly actor: SessionUser) {
    this.users = new UsersRepository(db);
    this.sessions = new SessionsRepository(db);
  }

  list(): Promise<User[]> {
    return this.users.list();
  }

  async create(body: CreateUser): Promise<User> {
    this.requireAdmin();
    const passwordHash = await hashPassword(body.password);
    try {
      return await this.users.insert({ username: body.username, displayName: body.displayName, isAdmin: body.isAdmin, passwordHash });
    } catch (error) {
      if (uniqueViolation(error) !== null) throw apiErrors.alreadyExists('username', `"${body.username}" is taken`);
      throw error;
    }
  }

  async update(userId: string, body: UpdateUser): Promise<User> {
    this.requireAdmin();
    const existing = await this.users.findById(userId);
    if (!existing) throw apiErrors.notFound('no user with this id');
    const losesAdmin = existing.isAdmin && !existing.disabled && (body.isAdmin === false || body.disabled === true);
    if (losesAdmin && existing.id === this.actor.id) {
      throw apiErrors.conflict('you cannot remove your own admin rights or disable your own account; ask another admin');
    }
    if (losesAdmin && (await this.users.countActiveAdmins()) <= 1) {
      throw apiErrors.conflict('this is the last active admin; make another user admin first');
    }
    const passwordHash = body.password === undefined ? undefined : await hashPassword(body.password);
    const updated = await this.users.update(userId, {
      displayName: body.displayName,
      isAdmin: body.isAdmin,
      disabled: body.disabled,
      passwordHash,
    });
    if (!updated) throw apiErrors.notFound('no user with this id');
    if (passwordHash !== undefined || body.disabled === true) await this.sessions.endSessionsOf(userId);
    return updated;
  }

  private requireAdmin(): void {
    if (!this.actor.isAdmin) throw apiErrors.forbidden('only a site admin may manage user accounts');
  }
}
