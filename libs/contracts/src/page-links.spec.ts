import { describe, expect, it } from 'vitest';
import { canOpen, nightPageFor, sectionOfPath } from './page-links';
import { SECTIONS } from './sections';
import { ROLES } from './roles';

const night = { planId: 'p-1', serviceDate: '2026-12-09' };

describe('night pages by role', () => {
  it('sends each role to a page it can use', () => {
    expect(nightPageFor(['yard'], night).path).toBe('/yard?night=2026-12-09');
    expect(nightPageFor(['supervisor'], night).path).toBe('/plans?date=2026-12-09&plan=p-1');
    expect(nightPageFor(['finance'], night).path).toBe('/costs/nights/p-1');
    expect(nightPageFor(['facilities'], night).section).toBe('plans');
    expect(nightPageFor(['admin'], night).section).toBe('plans');
    for (const role of ROLES) {
      const page = nightPageFor([role], night);
      expect(canOpen([role], page.path)).toBe(true);
      expect(SECTIONS.find((s) => s.key === page.section)!.roles).toContain(role);
    }
  });

  it('several roles: the first in the order of the home sections', () => {
    expect(nightPageFor(['yard', 'supervisor'], night).section).toBe('plans');
    expect(nightPageFor(['finance', 'yard'], night).section).toBe('yard');
    expect(nightPageFor(['admin', 'finance'], night).section).toBe('costs');
  });
});

describe('paths and sections', () => {
  it('finds the section of a path with or without query and sub-path', () => {
    expect(sectionOfPath('/plans?plan=x')?.key).toBe('plans');
    expect(sectionOfPath('/plans/abc')?.key).toBe('plans');
    expect(sectionOfPath('/yard')?.key).toBe('yard');
    expect(sectionOfPath('/not-available')).toBeNull();
    expect(sectionOfPath('/planscape')).toBeNull();
  });

  it('a yard person cannot open Plans or Costs; anyone may open pages outside the sections', () => {
    expect(canOpen(['yard'], '/plans?plan=x')).toBe(false);
    expect(canOpen(['yard'], '/costs/nights/x')).toBe(false);
    expect(canOpen(['yard'], '/yard?night=2026-12-09')).toBe(true);
    expect(canOpen(['yard'], '/somewhere')).toBe(true);
  });

  it('invitation and reset links (set-password) open for every role', () => {
    for (const role of ROLES) expect(canOpen([role], '/set-password?token=abc')).toBe(true);
  });
});
