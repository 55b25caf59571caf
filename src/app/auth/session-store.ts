import { HttpClient } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import type { ChangePasswordBody, SignInBody } from '../../../shared/api/auth.js';
import { user, type User } from '../../../shared/api/users.js';
import { isApiError } from '../errors/api-error';
import { unauthenticatedHandled } from '../http/handles-unauthenticated';
import { completed, parsed } from '../http/parse-response';

/** Who is signed in. The session itself is a server cookie; this store mirrors its user. */
@Injectable({ providedIn: 'root' })
export class SessionStore {
  private readonly http = inject(HttpClient);
  private readonly signedInUser = signal<User | null>(null);
  private restoring: Promise<User | null> | null = null;

  readonly user = this.signedInUser.asReadonly();
  readonly isAdmin = computed(() => this.signedInUser()?.isAdmin ?? false);

  /** Asks the server once per page load whether the cookie still holds a session. */
  restore(): Promise<User | null> {
    this.restoring ??= this.fetchCurrentUser();
    return this.restoring;
  }

  async signIn(credentials: SignInBody): Promise<User> {
    const signedIn = await parsed(
      'POST /api/auth/sign-in',
      this.http.post('/api/auth/sign-in', credentials, { context: unauthenticatedHandled() }),
      user,
    );
    this.signedInUser.set(signedIn);
    this.restoring = Promise.resolve(signedIn);
    return signedIn;
  }

  async signOut(): Promise<void> {
    await completed(this.http.post('/api/auth/sign-out', {}, { context: unauthenticatedHandled() }));
    this.forget();
  }

  async changePassword(change: ChangePasswordBody): Promise<void> {
    await completed(this.http.post('/api/auth/password', change));
  }

  /** Drops the mirrored user after the server ended the session. */
  forget(): void {
    this.signedInUser.set(null);
    this.restoring = Promise.resolve(null);
  }

  private async fetchCurrentUser(): Promise<User | null> {
    try {
      const current = await parsed('GET /api/auth/me', this.http.get('/api/auth/me', { context: unauthenticatedHandled() }), user);
      this.signedInUser.set(current);
      return current;
    } catch (error) {
      if (isApiError(error, 401)) return null;
      this.restoring = null;
      throw error;
    }
  }
}
