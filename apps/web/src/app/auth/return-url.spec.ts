import { landingUrl, returnUrlFrom } from './return-url';

describe('after sign-in', () => {
  it('goes to the return URL when the roles can open it', () => {
    expect(landingUrl('/yard?night=2026-12-09', ['yard'], '/yard')).toBe('/yard?night=2026-12-09');
    expect(landingUrl('/plans?date=2026-12-09&plan=p', ['supervisor'], '/plans')).toBe('/plans?date=2026-12-09&plan=p');
  });

  it('lands home for a page the roles cannot open (a link meant for another role)', () => {
    expect(landingUrl('/plans?plan=p', ['yard'], '/yard')).toBe('/yard');
    expect(landingUrl('/costs/nights/p', ['yard'], '/yard')).toBe('/yard');
    expect(landingUrl('/people', ['finance'], '/costs')).toBe('/costs');
  });

  it('lands home for unsafe or missing return URLs', () => {
    expect(landingUrl('//evil.example', ['yard'], '/yard')).toBe('/yard');
    expect(landingUrl('https://evil.example', ['yard'], '/yard')).toBe('/yard');
    expect(landingUrl(undefined, ['yard'], '/yard')).toBe('/yard');
  });

  it('remembers no return URL for / or the sign-in pages', () => {
    expect(returnUrlFrom('/')).toBeUndefined();
    expect(returnUrlFrom('/sign-in?returnUrl=%2Fyard')).toBeUndefined();
    expect(returnUrlFrom('/depot')).toBe('/depot');
  });
});
