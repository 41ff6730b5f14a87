import { HttpClient, HttpHeaders } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { RatePlan, RatePreview, SaveRatePlan, UrdbImportResult } from '@nightyard/contracts';
import { firstValueFrom, map } from 'rxjs';

/** Rate plans, their day previews, URDB import and which plan bills the depot from when. */
@Injectable({ providedIn: 'root' })
export class RatesApi {
  private readonly http = inject(HttpClient);

  list(): Promise<RatePlan[]> {
    return firstValueFrom(this.http.get<{ ratePlans: RatePlan[] }>('/api/rate-plans').pipe(map((r) => r.ratePlans)));
  }

  get(id: string): Promise<RatePlan> {
    return firstValueFrom(
      this.http.get<{ ratePlan: RatePlan }>(`/api/rate-plans/${encodeURIComponent(id)}`).pipe(map((r) => r.ratePlan)),
    );
  }

  create(body: SaveRatePlan): Promise<RatePlan> {
    return firstValueFrom(this.http.post<{ ratePlan: RatePlan }>('/api/rate-plans', body).pipe(map((r) => r.ratePlan)));
  }

  update(id: string, body: SaveRatePlan): Promise<RatePlan> {
    return firstValueFrom(
      this.http
        .put<{ ratePlan: RatePlan }>(`/api/rate-plans/${encodeURIComponent(id)}`, body)
        .pipe(map((r) => r.ratePlan)),
    );
  }

  remove(id: string): Promise<void> {
    return firstValueFrom(this.http.delete<void>(`/api/rate-plans/${encodeURIComponent(id)}`));
  }

  /** The prices of one local day; `timezone` is the depot's (clock changes depend on it). */
  preview(id: string, date: string, timezone?: string): Promise<RatePreview> {
    const params: Record<string, string> = timezone ? { date, timezone } : { date };
    return firstValueFrom(this.http.get<RatePreview>(`/api/rate-plans/${encodeURIComponent(id)}/preview`, { params }));
  }

  /** Maps an uploaded URDB record (the file's JSON text, sent as it is) for review; saves nothing. */
  importUrdb(fileText: string): Promise<UrdbImportResult> {
    return firstValueFrom(
      this.http.post<UrdbImportResult>('/api/rate-plans/import-urdb', fileText, {
        headers: new HttpHeaders({ 'Content-Type': 'application/json' }),
      }),
    );
  }

  assign(depotId: string, ratePlanId: string, effectiveFrom: string): Promise<void> {
    return firstValueFrom(
      this.http.post<void>(`/api/depots/${encodeURIComponent(depotId)}/rate-plans`, { ratePlanId, effectiveFrom }),
    );
  }

  unassign(depotId: string, effectiveFrom: string): Promise<void> {
    return firstValueFrom(
      this.http.delete<void>(
        `/api/depots/${encodeURIComponent(depotId)}/rate-plans/${encodeURIComponent(effectiveFrom)}`,
      ),
    );
  }
}
