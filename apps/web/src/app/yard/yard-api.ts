import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  DepotDetail,
  Tonight,
  YardReport,
  YardReportResult,
  yardConfirmationSchema,
  yardReportSchema,
} from '@nightyard/contracts';
import { firstValueFrom, map } from 'rxjs';
import type { z } from 'zod';

export type YardConfirmation = z.infer<typeof yardConfirmationSchema>;
/** A report as the client sends it (the API fills defaults such as an empty reason). */
export type YardReportRequest = z.input<typeof yardReportSchema>;

/** The yard's calls: tonight's steps, the shift's cautions, confirmations and reports. */
@Injectable({ providedIn: 'root' })
export class YardApi {
  private readonly http = inject(HttpClient);

  tonight(depotId: string): Promise<Tonight> {
    return firstValueFrom(this.http.get<Tonight>(`/api/depots/${encodeURIComponent(depotId)}/tonight`));
  }

  /** The depot's chargers with what each last reported over OCPP. */
  depot(depotId: string): Promise<DepotDetail> {
    return firstValueFrom(
      this.http.get<{ depot: DepotDetail }>(`/api/depots/${encodeURIComponent(depotId)}`).pipe(map((r) => r.depot)),
    );
  }

  acknowledge(depotId: string): Promise<void> {
    return firstValueFrom(
      this.http.post<void>(`/api/depots/${encodeURIComponent(depotId)}/tonight/acknowledge`, null),
    ).then(() => undefined);
  }

  /** `at`: when it really happened (depot time HH:mm), for a step confirmed late. */
  confirm(planId: string, stepKey: string, at?: string): Promise<YardConfirmation> {
    return firstValueFrom(
      this.http.post<YardConfirmation>('/api/yard/confirmations', at ? { planId, stepKey, at } : { planId, stepKey }),
    );
  }

  /** A step that did not happen: the server re-plans the rest of the night and publishes it. */
  missed(depotId: string, planId: string, stepKey: string): Promise<YardReportResult> {
    return firstValueFrom(
      this.http.post<YardReportResult>(`/api/depots/${encodeURIComponent(depotId)}/tonight/missed`, {
        planId,
        stepKey,
      }),
    );
  }

  report(depotId: string, body: YardReportRequest | YardReport): Promise<YardReportResult> {
    return firstValueFrom(
      this.http.post<YardReportResult>(`/api/depots/${encodeURIComponent(depotId)}/tonight/reports`, body),
    );
  }
}
