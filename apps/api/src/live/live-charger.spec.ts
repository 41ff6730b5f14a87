import { describe, expect, it } from 'vitest';
import { liveStatusOf } from '../ocpp/central-system';
import { liveStatusFor } from './live-charger';

// OCPP 1.6 ChargePointStatus and OCPP 2.0.1 ConnectorStatusEnumType, as the specifications list them.
describe('live status from what a charger reports', () => {
  it('tells a bus on the connector from an empty one, in both versions', () => {
    expect(liveStatusOf('Available')).toBe('available');
    expect(liveStatusOf('Charging')).toBe('charging');
    for (const s of ['Preparing', 'SuspendedEV', 'SuspendedEVSE', 'Finishing', 'Occupied'])
      expect(liveStatusOf(s), s).toBe('connected');
    expect(liveStatusOf('Faulted')).toBe('faulted');
    expect(liveStatusOf('Unavailable')).toBe('offline');
  });

  it('a plugged-in charger drawing power is charging (2.0.1 says Occupied for both); one not connected is offline', () => {
    expect(liveStatusFor({ liveConnected: true, liveStatus: 'connected', livePowerW: 42_000 })).toBe('charging');
    expect(liveStatusFor({ liveConnected: true, liveStatus: 'connected', livePowerW: 0 })).toBe('connected');
    expect(liveStatusFor({ liveConnected: true, liveStatus: 'connected', livePowerW: null })).toBe('connected');
    expect(liveStatusFor({ liveConnected: false, liveStatus: 'charging', livePowerW: 42_000 })).toBe('offline');
    expect(liveStatusFor({ liveConnected: true, liveStatus: null, livePowerW: null })).toBe('available');
    expect(liveStatusFor({ liveConnected: true, liveStatus: 'something else', livePowerW: null })).toBe('available');
  });
});
