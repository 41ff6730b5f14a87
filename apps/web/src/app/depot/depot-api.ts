import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  Cabinet,
  Charger,
  ChargerInput,
  DepotDetail,
  DepotSettings,
  LoadReductionWindow,
  PeaksSoFar,
  YardCrew,
} from '@nightyard/contracts';
import { firstValueFrom, map } from 'rxjs';

/** What the Depot section sends for a load-reduction window (local wall-clock times). */
export interface LoadReductionWindowInput {
  start: string;
  end: string;
  limitKw: number;
  note: string;
}

/** A depot's set-up: settings, chargers, power cabinets, load-reduction windows, peaks so far. */
@Injectable({ providedIn: 'root' })
export class DepotApi {
  private readonly http = inject(HttpClient);

  private url(depotId: string, ...rest: string[]): string {
    return `/api/depots/${[depotId, ...rest].map(encodeURIComponent).join('/')}`;
  }

  detail(depotId: string): Promise<DepotDetail> {
    return firstValueFrom(this.http.get<{ depot: DepotDetail }>(this.url(depotId)).pipe(map((r) => r.depot)));
  }

  saveSettings(depotId: string, body: DepotSettings): Promise<DepotDetail> {
    return firstValueFrom(this.http.put<{ depot: DepotDetail }>(this.url(depotId), body).pipe(map((r) => r.depot)));
  }

  addCharger(depotId: string, body: ChargerInput): Promise<Charger> {
    return firstValueFrom(
      this.http.post<{ charger: Charger }>(this.url(depotId, 'chargers'), body).pipe(map((r) => r.charger)),
    );
  }

  updateCharger(depotId: string, id: string, body: ChargerInput): Promise<Charger> {
    return firstValueFrom(
      this.http.put<{ charger: Charger }>(this.url(depotId, 'chargers', id), body).pipe(map((r) => r.charger)),
    );
  }

  /** The charger's OCPP identity and password (the charger connects with them). */
  setOcpp(depotId: string, id: string, body: { identity: string; password: string }): Promise<void> {
    return firstValueFrom(this.http.put<void>(`${this.url(depotId, 'chargers', id)}/ocpp`, body));
  }

  removeCharger(depotId: string, id: string): Promise<void> {
    return firstValueFrom(this.http.delete<void>(this.url(depotId, 'chargers', id)));
  }

  addCabinet(depotId: string, body: { label: string; limitKw: number }): Promise<Cabinet> {
    return firstValueFrom(
      this.http.post<{ cabinet: Cabinet }>(this.url(depotId, 'cabinets'), body).pipe(map((r) => r.cabinet)),
    );
  }

  updateCabinet(depotId: string, id: string, body: { label: string; limitKw: number }): Promise<Cabinet> {
    return firstValueFrom(
      this.http.put<{ cabinet: Cabinet }>(this.url(depotId, 'cabinets', id), body).pipe(map((r) => r.cabinet)),
    );
  }

  removeCabinet(depotId: string, id: string): Promise<void> {
    return firstValueFrom(this.http.delete<void>(this.url(depotId, 'cabinets', id)));
  }

  /** Replaces every window: all are saved, or none. */
  replaceLoadReductionWindows(depotId: string, windows: LoadReductionWindowInput[]): Promise<LoadReductionWindow[]> {
    return firstValueFrom(
      this.http
        .put<{ windows: LoadReductionWindow[] }>(this.url(depotId, 'load-reduction-windows'), { windows })
        .pipe(map((r) => r.windows)),
    );
  }

  savePeaksSoFar(depotId: string, body: PeaksSoFar): Promise<PeaksSoFar> {
    return firstValueFrom(
      this.http.put<{ peaksSoFar: PeaksSoFar }>(this.url(depotId, 'peaks-so-far'), body).pipe(map((r) => r.peaksSoFar)),
    );
  }

  saveYardCrew(depotId: string, body: YardCrew): Promise<YardCrew> {
    return firstValueFrom(
      this.http.put<{ yardCrew: YardCrew }>(this.url(depotId, 'yard-crew'), body).pipe(map((r) => r.yardCrew)),
    );
  }
}
