import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  AdoptedPlan,
  DateNight,
  DepotDetail,
  PlanComparison,
  PlanDetail,
  PlanSummary,
  WhatIfAdoption,
} from '@nightyard/contracts';
import { firstValueFrom, map } from 'rxjs';

/** Plan versions of a depot's nights: generate, read, compare, publish, what-if. */
@Injectable({ providedIn: 'root' })
export class PlansApi {
  private readonly http = inject(HttpClient);

  /** Where a date stands among the depot's service days: its own night, or inside another's. */
  dateNight(depotId: string, date: string): Promise<DateNight> {
    return firstValueFrom(
      this.http.get<DateNight>(`/api/depots/${encodeURIComponent(depotId)}/nights/${encodeURIComponent(date)}`),
    );
  }

  list(depotId: string, serviceDate: string): Promise<PlanSummary[]> {
    return firstValueFrom(
      this.http
        .get<{ plans: PlanSummary[] }>(`/api/depots/${encodeURIComponent(depotId)}/plans`, { params: { serviceDate } })
        .pipe(map((r) => r.plans)),
    );
  }

  /** Starts the engine in the background (202); poll `plan()` until it is done or failed. */
  generate(depotId: string, serviceDate: string, includeMidday: boolean): Promise<PlanSummary> {
    return firstValueFrom(
      this.http
        .post<{ plan: PlanSummary }>(`/api/depots/${encodeURIComponent(depotId)}/plans`, { serviceDate, includeMidday })
        .pipe(map((r) => r.plan)),
    );
  }

  /** Plans an uploaded scenario file as a what-if draft (202). */
  whatIf(depotId: string, scenario: unknown): Promise<PlanSummary> {
    return firstValueFrom(
      this.http
        .post<{ plan: PlanSummary }>(`/api/depots/${encodeURIComponent(depotId)}/plans/what-if`, scenario)
        .pipe(map((r) => r.plan)),
    );
  }

  plan(id: string): Promise<PlanDetail> {
    return firstValueFrom(
      this.http.get<{ plan: PlanDetail }>(`/api/plans/${encodeURIComponent(id)}`).pipe(map((r) => r.plan)),
    );
  }

  /** The plan's scenario file as a Blob (fetched with the bearer token). */
  scenario(id: string): Promise<Blob> {
    return firstValueFrom(this.http.get(`/api/plans/${encodeURIComponent(id)}/scenario`, { responseType: 'blob' }));
  }

  /** The plan as OCPP SetChargingProfile payloads, one per charger (published plans only). */
  ocppProfiles(id: string, version: '1.6' | '2.0.1'): Promise<Blob> {
    return firstValueFrom(
      this.http.get(`/api/plans/${encodeURIComponent(id)}/ocpp`, { params: { version }, responseType: 'blob' }),
    );
  }

  compare(id: string, withId: string): Promise<PlanComparison> {
    return firstValueFrom(
      this.http.get<PlanComparison>(`/api/plans/${encodeURIComponent(id)}/compare`, { params: { with: withId } }),
    );
  }

  /** Rejects with 409 when another version was published since `expectedPublishedId` was seen. */
  publish(id: string, expectedPublishedId: string | null): Promise<PlanSummary> {
    return firstValueFrom(
      this.http
        .post<{ plan: PlanSummary }>(`/api/plans/${encodeURIComponent(id)}/publish`, { expectedPublishedId })
        .pipe(map((r) => r.plan)),
    );
  }

  /** What adopting a what-if would change (its study re-checked against the depot now); 409 when it cannot be adopted. */
  adoption(id: string): Promise<WhatIfAdoption> {
    return firstValueFrom(this.http.get<WhatIfAdoption>(`/api/plans/${encodeURIComponent(id)}/adoption`));
  }

  /** Adopts a what-if: a new normal draft generated from the depot as it is now (202). */
  adopt(id: string): Promise<AdoptedPlan> {
    return firstValueFrom(this.http.post<AdoptedPlan>(`/api/plans/${encodeURIComponent(id)}/adopt`, {}));
  }

  /** The depot's chargers (to show idle ones on the timeline too). */
  depot(depotId: string): Promise<DepotDetail> {
    return firstValueFrom(
      this.http.get<{ depot: DepotDetail }>(`/api/depots/${encodeURIComponent(depotId)}`).pipe(map((r) => r.depot)),
    );
  }
}
