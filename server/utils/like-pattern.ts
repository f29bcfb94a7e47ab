/** `text` lower-cased as a LIKE pattern that matches it anywhere, with LIKE's wildcards taken literally. */
export function containsPattern(text: string): string {
  return `%${text.toLowerCase().replace(/[\\%_]/g, c => `\\${c}`)}%`
}
