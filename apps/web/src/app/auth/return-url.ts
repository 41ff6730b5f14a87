// A plain module of the contracts, not the index: this is in the first download (see auth-store).
import { canOpen } from '@nightyard/contracts/page-links';
import type { Role } from '@nightyard/contracts';

/** Only same-site paths are followed after sign-in (no `//evil.example` or `https://...`). */
export function safeReturnUrl(value: string | null | undefined): string | null {
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) {
    return null;
  }
  if (value.startsWith('/sign-in') || value.startsWith('/set-password') || value.startsWith('/forgot-password')) {
    return null;
  }
  return value;
}

/**
 * Where to go after sign-in: the return URL when it is safe and the person's roles can open it,
 * otherwise their home (never a page that would only say "not available for your role").
 */
export function landingUrl(value: string | null | undefined, roles: readonly Role[], home: string): string {
  const url = safeReturnUrl(value);
  return url && canOpen(roles, url) ? url : home;
}

/** The return URL to remember for the page at `current` (none for `/` and the sign-in pages). */
export function returnUrlFrom(current: string): string | undefined {
  return current && current !== '/' && safeReturnUrl(current) ? current : undefined;
}
