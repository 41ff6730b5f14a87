export interface TextPart {
  text: string;
  href: string | null;
}

const URL_PATTERN = /https?:\/\/[^\s<>"')]+/g;

/** Splits plain text so web addresses can be shown as links (Angular still sanitises the href). */
export function textWithLinks(text: string): TextPart[] {
  const parts: TextPart[] = [];
  let last = 0;
  for (const match of text.matchAll(URL_PATTERN)) {
    const start = match.index ?? 0;
    if (start > last) parts.push({ text: text.slice(last, start), href: null });
    parts.push({ text: match[0], href: match[0] });
    last = start + match[0].length;
  }
  if (last < text.length) parts.push({ text: text.slice(last), href: null });
  return parts;
}
