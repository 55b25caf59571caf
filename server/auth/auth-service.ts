import type { ChangePasswordBody } from '../../shared/api/auth.js';
import type { Database } from '../db/client.js';
import { apiErrors } from '../errors.js';
import { UsersRepository } from '../users/users-repository.js';
import { hashPassword, verifyPassword } from './passwords.js';
import type { SessionUser } from './session-user.js';
import { SessionsRepository } from './sessions-repository.js';

/** The signed-in user's own account: changing the password ends every other session of theirs. */
export class AuthService {
  private readonly users: UsersRepository;
  private readonly sessions: SessionsRepository;

  constructor(db: Database, private readonly user: SessionUser) {
    this.users = new UsersRepository(db);
    this.sessions = new SessionsRepository(db);
  }

  async changePassword(body: ChangePasswordBody, currentSid: string): Promise<void> {
    const stored = await this.users.passwordHashOf(this.user.id);
    if (!stored || !(await verifyPassword(body.currentPassword, stored))) {
      throw apiErrors.invalidField('currentPassword', 'is not your current password');
    }
    await this.users.update(this.user.id, { passwordHash: await hashPassword(body.newPassword) });
    await this.sessions.endSessionsOf(this.user.id, currentSid);
  }
}
