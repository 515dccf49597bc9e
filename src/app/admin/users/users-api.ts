import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { UserSummary } from '../../../../shared/api-types';
import type { Role } from '../../../../shared/roles';

export interface InvitationRequest {
  email: string;
  name: string;
  role: Role;
  farmId?: number | null;
}

export interface UserPatch {
  name?: string;
  role?: Role;
  farmId?: number | null;
  active?: boolean;
}

/** The admin's changes to user accounts (reads go through `httpResource` in the page). */
@Injectable({ providedIn: 'root' })
export class UsersApi {
  readonly #http = inject(HttpClient);

  invite(invitation: InvitationRequest): Promise<UserSummary> {
    return firstValueFrom(this.#http.post<UserSummary>('/api/users/invitations', invitation));
  }

  update(id: number, patch: UserPatch): Promise<UserSummary> {
    return firstValueFrom(this.#http.patch<UserSummary>(`/api/users/${id}`, patch));
  }

  resendInvitation(id: number): Promise<{ message: string }> {
    return firstValueFrom(this.#http.post<{ message: string }>(`/api/users/${id}/invitation`, null));
  }

  sendPasswordReset(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.post(`/api/users/${id}/password-reset`, null, { responseType: 'text' }));
  }
}
