import { HttpClient } from '@angular/common/http';
import { Injectable, inject, signal } from '@angular/core';
import { member, memberList, type Member, type ProjectRole } from '../../../shared/api/projects.js';
import { completed, parsed } from '../http/parse-response';

/** The members of one project and the lead's changes to them; provided by the members page. */
@Injectable()
export class MemberRoster {
  private readonly http = inject(HttpClient);
  private readonly listed = signal<readonly Member[]>([]);

  readonly members = this.listed.asReadonly();

  async load(projectId: string): Promise<void> {
    const url = `/api/projects/${encodeURIComponent(projectId)}/members`;
    this.listed.set(await parsed(`GET ${url}`, this.http.get(url), memberList));
  }

  /** Adds the user, or changes the role of a member. */
  async setRole(projectId: string, userId: string, role: ProjectRole): Promise<Member> {
    const url = this.memberUrl(projectId, userId);
    const saved = await parsed(`PUT ${url}`, this.http.put(url, { role }), member);
    this.listed.update((members) =>
      members.some((candidate) => candidate.userId === saved.userId)
        ? members.map((candidate) => (candidate.userId === saved.userId ? saved : candidate))
        : [...members, saved].sort((a, b) => a.displayName.localeCompare(b.displayName)),
    );
    return saved;
  }

  async remove(projectId: string, userId: string): Promise<void> {
    await completed(this.http.delete(this.memberUrl(projectId, userId)));
    this.listed.update((members) => members.filter((candidate) => candidate.userId !== userId));
  }

  private memberUrl(projectId: string, userId: string): string {
    return `/api/projects/${encodeURIComponent(projectId)}/members/${encodeURIComponent(userId)}`;
  }
}
