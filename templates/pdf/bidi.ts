/**
 * Visual order of text runs for lines that mix right-to-left scripts (Hebrew, Arabic) with others: a
 * single-level reading of the Unicode Bidirectional Algorithm (UAX #9) at run granularity. fontkit
 * already lays out each Hebrew or Arabic run right to left (and shapes Arabic); what is left is the order
 * of the runs on the line. The first strong character sets the line's direction; a neutral run (spaces,
 * punctuation) takes the direction of its neighbours when they agree and the line's otherwise; numbers
 * and Latin keep their own left-to-right order inside a right-to-left line.
 */

const RTL = /[\p{Script=Hebrew}\p{Script=Arabic}]/u;
const STRONG_LTR = /[\p{L}\p{N}]/u;

export function hasRightToLeft(text: string): boolean {
  return RTL.test(text);
}

type Direction = 'rtl' | 'ltr' | null;

function strength(text: string): Direction {
  if (RTL.test(text)) return 'rtl';
  if (STRONG_LTR.test(text)) return 'ltr';
  return null;
}

/** The runs of one line in the order they are drawn from left to right; `text` of each stays logical. */
export function visualOrder<R extends { text: string }>(runs: readonly R[]): R[] {
  const strong = runs.map((r) => strength(r.text));
  const base: Exclude<Direction, null> = strong.find((d) => d !== null) ?? 'ltr';
  const resolved = strong.map((d, i) => {
    if (d) return d;
    const before =
      strong
        .slice(0, i)
        .reverse()
        .find((x) => x !== null) ?? base;
    const after = strong.slice(i + 1).find((x) => x !== null) ?? base;
    return before === after ? before : base;
  });
  const order = runs.map((_, i) => i);
  // Reverse each stretch that runs against the line's direction, then the whole line if it is RTL.
  const against = base === 'ltr' ? 'rtl' : 'ltr';
  let out: number[] = [];
  for (let i = 0; i < order.length;) {
    if (resolved[i] !== against) {
      out.push(i);
      i += 1;
      continue;
    }
    let j = i;
    while (j < order.length && resolved[j] === against) j += 1;
    out.push(...order.slice(i, j).reverse());
    i = j;
  }
  if (base === 'rtl') out = out.reverse();
  return out.map((i) => runs[i]!);
}
