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
