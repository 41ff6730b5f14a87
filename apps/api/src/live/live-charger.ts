import { liveStatusSchema, type LiveCharger, type LiveStatus } from '@nightyard/contracts';

export interface LiveRow {
  id: string;
  label: string;
  liveConnected: boolean | null;
  liveStatus: string | null;
  livePowerW: number | null;
  liveSeenAt: Date | null;
}

/**
 * A charger's live status as the pages show it: offline unless connected to Nightyard; a bus
 * plugged in that draws power is charging (OCPP 2.0.1 reports both as Occupied).
 */
export function liveStatusFor(row: Pick<LiveRow, 'liveConnected' | 'liveStatus' | 'livePowerW'>): LiveStatus {
  if (row.liveConnected !== true) return 'offline';
  const parsed = liveStatusSchema.safeParse(row.liveStatus ?? 'available');
  const status = parsed.success ? parsed.data : 'available';
  return status === 'connected' && (row.livePowerW ?? 0) > 0 ? 'charging' : status;
}

/** A charger's live state as the pages show it, power in kW (0.1). */
export function liveChargerOf(row: LiveRow): LiveCharger {
  const connected = row.liveConnected === true;
  return {
    chargerId: row.id,
    label: row.label,
    status: liveStatusFor(row),
    powerKw: connected && row.livePowerW !== null ? Math.round(row.livePowerW / 100) / 10 : null,
    seenAt: row.liveSeenAt?.toISOString() ?? null,
  };
}
