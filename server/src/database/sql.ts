/** A LIKE pattern that finds `text` anywhere, with `%`, `_` and `\\` in it taken literally. */
export function likePattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}
