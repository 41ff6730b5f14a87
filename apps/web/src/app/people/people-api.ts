import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { InviteUserRequest, OutboxMessage, UpdateUserRequest, User } from '@nightyard/contracts';
import { firstValueFrom, map } from 'rxjs';

/** People (users of the organisation) and the development outbox. Admin only. */
@Injectable({ providedIn: 'root' })
export class PeopleApi {
  private readonly http = inject(HttpClient);

  list(): Promise<User[]> {
    return firstValueFrom(this.http.get<{ users: User[] }>('/api/users').pipe(map((r) => r.users)));
  }

  invite(body: InviteUserRequest): Promise<User> {
    return firstValueFrom(this.http.post<{ user: User }>('/api/users/invite', body).pipe(map((r) => r.user)));
  }

  update(id: string, body: UpdateUserRequest): Promise<User> {
    return firstValueFrom(
      this.http.patch<{ user: User }>(`/api/users/${encodeURIComponent(id)}`, body).pipe(map((r) => r.user)),
    );
  }

  outbox(): Promise<OutboxMessage[]> {
    return firstValueFrom(this.http.get<{ messages: OutboxMessage[] }>('/api/dev/outbox').pipe(map((r) => r.messages)));
  }
}
