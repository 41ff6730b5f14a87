import { serviceLimitWarning } from './depot-settings-panel';

describe('serviceLimitWarning', () => {
  it('names the likelier slip first: kW typed as W, then a limit under the other load, then under a charger', () => {
    expect(serviceLimitWarning(60_000, 150, 46)).toMatch(/^60,000 kW is above 50 MW/);
    // 30 kW under a building that draws up to 46 kW: no bus could charge in that hour at all.
    expect(serviceLimitWarning(30, 150, 46)).toBe(
      "30 kW is no more than the depot's other load (46 kW at its highest): no bus could charge then. Check the figure.",
    );
    expect(serviceLimitWarning(100, 150, 46)).toBe(
      "100 kW is below the depot's largest charger (150 kW). Check the figure.",
    );
    expect(serviceLimitWarning(450, 150, 46)).toBeNull();
    expect(serviceLimitWarning(null, 150, 46)).toBeNull();
  });
});
