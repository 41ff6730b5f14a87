import type { LiveCharger } from '@nightyard/contracts';

export interface LiveRow {
  id: string;
  label: string;
  liveConnected: boolean | null;
  liveStatus: string | null;
  livePowerW: number | null;
  liveSeenAt: Date | null;
}

/** A charger's live state as the pages show it: offline unless connected, power in kW (0.1). */
export function liveChargerOf(row: LiveRow): LiveCharger {
  const connected = row.liveConnected === true;
  return {
    chargerId: row.id,
    label: row.label,
    status: connected ? ((row.liveStatus ?? 'available') as LiveCharger['status']) : 'offline',
    powerKw: connected && row.livePowerW !== null ? Math.round(row.livePowerW / 100) / 10 : null,
    seenAt: row.liveSeenAt?.toISOString() ?? null,
  };
}
