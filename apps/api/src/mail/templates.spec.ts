import { describe, expect, it } from 'vitest';
import { planPublishedMail } from './templates';

describe('the published-plan e-mail', () => {
  it("lists each changed bus's plug-ins before and after, so the yard knows which run sheets changed", () => {
    const mail = planPublishedMail({
      to: 'yard@example.org',
      name: 'Kofi',
      depot: 'Test depot',
      night: 'Friday, December 4, 2026',
      version: 2,
      publishedBy: 'Sam Reyes',
      buses: 24,
      sessions: 26,
      currency: 'USD',
      cost: 129.62,
      energy: 129.62,
      baseline: 150,
      baselineName: 'Timer',
      short: [],
      changed: { version: 1, buses: ['216'], lines: ['216: D2 21:15-05:30 → C4 05:00-05:45'] },
      link: { label: 'Open the plan', url: 'http://localhost/plans/x' },
    });
    expect(mail.text).toContain(
      'Against version 1: 1 bus changes charger or times (216); every other bus keeps its charger and times.\n- 216: D2 21:15-05:30 → C4 05:00-05:45\n',
    );
  });
});
