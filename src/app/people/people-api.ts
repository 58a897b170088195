import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { AuditEntryView, AuditVerification } from '@shared/evaluation';
import type {
  InviteUser,
  PersonView,
  VendorOrganisationInput,
  VendorOrganisationView,
} from '@shared/people';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/** The administrator's calls about people and vendor organisations. */
@Injectable({ providedIn: 'root' })
export class PeopleApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  list(): Observable<PersonView[]> {
    return this.http.get<PersonView[]>(`${this.base}/users`);
  }

  /** The server e-mails the person a one-time link to set a password. */
  invite(person: InviteUser): Observable<PersonView> {
    return this.http.post<PersonView>(`${this.base}/users`, person);
  }

  /** Ends every session of the person at once. */
  deactivate(id: string): Observable<PersonView> {
    return this.http.post<PersonView>(`${this.base}/users/${encodeURIComponent(id)}/deactivate`, {});
  }

  reactivate(id: string): Observable<PersonView> {
    return this.http.post<PersonView>(`${this.base}/users/${encodeURIComponent(id)}/reactivate`, {});
  }

  /** Sends a fresh set-password link; earlier links stop working. */
  resendInvitation(id: string): Observable<void> {
    return this.http.post<void>(`${this.base}/users/${encodeURIComponent(id)}/invitation`, {});
  }

  /** E-mails the person, at their own address, a link to choose a new password. */
  sendPasswordReset(id: string): Observable<void> {
    return this.http.post<void>(`${this.base}/users/${encodeURIComponent(id)}/password-reset`, {});
  }

  /** The admin audit trail, oldest first. */
  auditTrail(): Observable<AuditEntryView[]> {
    return this.http.get<AuditEntryView[]>(`${this.base}/admin/audit`);
  }

  verifyAuditTrail(): Observable<AuditVerification> {
    return this.http.get<AuditVerification>(`${this.base}/admin/audit/verify`);
  }

  organisations(): Observable<VendorOrganisationView[]> {
    return this.http.get<VendorOrganisationView[]>(`${this.base}/vendor-organisations`);
  }

  addOrganisation(organisation: VendorOrganisationInput): Observable<VendorOrganisationView> {
    return this.http.post<VendorOrganisationView>(`${this.base}/vendor-organisations`, organisation);
  }
}
