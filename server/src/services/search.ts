/**
 * The one text search pattern of the lists (permits, people, caught mail): the words anywhere in the
 * text, for `ilike`, with `%`, `_` and `\` taken literally (PostgreSQL's default escape is `\`).
 */
export function containsPattern(words: string): string {
  return `%${words.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}
