/** `n` with its noun, singular or plural: "1 member", "3 members" (`plural` defaults to noun + "s"). */
export function countOf(n: number, noun: string, plural = `${noun}s`): string {
  return `${n} ${n === 1 ? noun : plural}`
}

/** A result count for a filtered list, verb agreeing: "1 member matches", "3 members match". */
export function matchCount(n: number, noun: string, plural = `${noun}s`): string {
  return `${countOf(n, noun, plural)} ${n === 1 ? 'matches' : 'match'}`
}
