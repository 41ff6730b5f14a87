import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { Bus, BusInput, ColdWeatherTable, ServiceDay, ServiceDayInput } from '@nightyard/contracts';
import { firstValueFrom, map } from 'rxjs';

/** The fleet of a depot: buses, cold-weather factors and each service day's runs. */
@Injectable({ providedIn: 'root' })
export class FleetApi {
  private readonly http = inject(HttpClient);

  private url(depotId: string, ...rest: string[]): string {
    return `/api/depots/${[depotId, ...rest].map(encodeURIComponent).join('/')}`;
  }

  buses(depotId: string): Promise<Bus[]> {
    return firstValueFrom(this.http.get<{ buses: Bus[] }>(this.url(depotId, 'buses')).pipe(map((r) => r.buses)));
  }

  addBus(depotId: string, body: BusInput): Promise<Bus> {
    return firstValueFrom(this.http.post<{ bus: Bus }>(this.url(depotId, 'buses'), body).pipe(map((r) => r.bus)));
  }

  updateBus(depotId: string, id: string, body: BusInput): Promise<Bus> {
    return firstValueFrom(this.http.put<{ bus: Bus }>(this.url(depotId, 'buses', id), body).pipe(map((r) => r.bus)));
  }

  coldWeather(depotId: string): Promise<ColdWeatherTable> {
    return firstValueFrom(
      this.http.get<{ bands: ColdWeatherTable }>(this.url(depotId, 'cold-weather')).pipe(map((r) => r.bands)),
    );
  }

  saveColdWeather(depotId: string, bands: ColdWeatherTable): Promise<ColdWeatherTable> {
    return firstValueFrom(
      this.http
        .put<{ bands: ColdWeatherTable }>(this.url(depotId, 'cold-weather'), { bands })
        .pipe(map((r) => r.bands)),
    );
  }

  serviceDay(depotId: string, date: string): Promise<ServiceDay> {
    return firstValueFrom(this.http.get<ServiceDay>(this.url(depotId, 'service-days', date)));
  }

  saveServiceDay(depotId: string, date: string, body: ServiceDayInput): Promise<ServiceDay> {
    return firstValueFrom(this.http.put<ServiceDay>(this.url(depotId, 'service-days', date), body));
  }

  /** Rejects with 409 when the day already has runs and `replace` is false. */
  copyServiceDay(depotId: string, date: string, fromDate: string, replace: boolean): Promise<ServiceDay> {
    return firstValueFrom(
      this.http.post<ServiceDay>(this.url(depotId, 'service-days', date, 'copy'), { fromDate, replace }),
    );
  }

  uploadRunsCsv(depotId: string, date: string, csv: string, forecastLowF: number | null): Promise<ServiceDay> {
    return firstValueFrom(
      this.http.post<ServiceDay>(this.url(depotId, 'service-days', date, 'csv'), { csv, forecastLowF }),
    );
  }

  /** The template as a Blob (fetched with the bearer token; a plain link would not carry it). */
  runsCsvTemplate(depotId: string, date: string): Promise<Blob> {
    return firstValueFrom(
      this.http.get(this.url(depotId, 'service-days', date, 'csv-template'), { responseType: 'blob' }),
    );
  }
}
