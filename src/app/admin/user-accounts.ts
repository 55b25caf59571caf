import { HttpClient } from '@angular/common/http';
import { Injectable, inject, signal } from '@angular/core';
import { user, userList, type CreateUserBody, type UpdateUserBody, type User } from '../../../shared/api/users.js';
import { parsed } from '../http/parse-response';

/** The user accounts: every signed-in user may list them (to add members); admins change them. */
@Injectable({ providedIn: 'root' })
export class UserAccounts {
  private readonly http = inject(HttpClient);
  private readonly listed = signal<readonly User[]>([]);

  readonly users = this.listed.asReadonly();

  async load(): Promise<void> {
    this.listed.set(await parsed('GET /api/users', this.http.get('/api/users'), userList));
  }

  async create(body: CreateUserBody): Promise<User> {
    const created = await parsed('POST /api/users', this.http.post('/api/users', body), user);
    this.listed.update((users) => [...users, created].sort((a, b) => a.username.localeCompare(b.username)));
    return created;
  }

  async update(userId: string, body: UpdateUserBody): Promise<User> {
    const url = `/api/users/${encodeURIComponent(userId)}`;
    const updated = await parsed(`PATCH ${url}`, this.http.patch(url, body), user);
    this.listed.update((users) => users.map((candidate) => (candidate.id === updated.id ? updated : candidate)));
    return updated;
  }
}
