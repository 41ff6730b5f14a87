import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { MeterImportResult, MonthCosts, PlanCosts } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';

/** What the meter-data import sends: the file's text as it is, and the billing period it is for. */
export interface MeterImportRequest {
  fileName: string;
  content: string;
  billingPeriodStart: string;
}

/** The Costs section's API: a billing period's costs, one plan's costs, meter data import. */
@Injectable({ providedIn: 'root' })
export class CostsApi {
  private readonly http = inject(HttpClient);

  /** The billing period holding `date` (YYYY-MM-DD) at the depot. */
  month(depotId: string, date: string): Promise<MonthCosts> {
    return firstValueFrom(
      this.http.get<MonthCosts>(`/api/depots/${encodeURIComponent(depotId)}/costs/month`, { params: { date } }),
    );
  }

  plan(planId: string): Promise<PlanCosts> {
    return firstValueFrom(this.http.get<PlanCosts>(`/api/plans/${encodeURIComponent(planId)}/costs`));
  }

  /** All or nothing: the API refuses the whole file when any reading is wrong. */
  importMeterData(depotId: string, body: MeterImportRequest): Promise<MeterImportResult> {
    return firstValueFrom(
      this.http.post<MeterImportResult>(`/api/depots/${encodeURIComponent(depotId)}/meter-data`, body),
    );
  }
}
