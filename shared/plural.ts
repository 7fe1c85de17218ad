/**
 * A count with its noun, in the one number format Ballast shows everywhere: "1 review", "2 reviews",
 * "1,204 clusters". Screens, PDFs, mail and job logs all read it, so a plural is never spelled by hand.
 */
export function countOf(n: number, one: string, many = `${one}s`): string {
  return `${n.toLocaleString('en-GB')} ${n === 1 ? one : many}`;
}
