export type TextPiece = { kind: "text"; text: string } | { kind: "link"; href: string; text: string };

/** Trailing characters that end a sentence rather than a URL ("…/invite/abc." or "(see https://x)"). */
const TRAILING = /[.,;:!?)\]}>'"]+$/;

/** Splits plain mail text into text and http(s) links, so links can be rendered clickable and nothing else is. */
export function linkify(text: string): TextPiece[] {
  const pieces: TextPiece[] = [];
  const pattern = /https?:\/\/[^\s<>"]+/g;
  let last = 0;
  for (const match of text.matchAll(pattern)) {
    const start = match.index ?? 0;
    const raw = match[0];
    const href = raw.replace(TRAILING, "");
    if (start > last) pieces.push({ kind: "text", text: text.slice(last, start) });
    pieces.push({ kind: "link", href, text: href });
    last = start + href.length;
  }
  if (last < text.length) pieces.push({ kind: "text", text: text.slice(last) });
  return pieces;
}
