/**
 * The one identity rule for Ballast's keys: item sku, review id, reviewer id and category slug. Two keys
 * are the same key exactly when their Unicode NFC forms, with surrounding whitespace trimmed, are equal,
 * code unit for code unit. So `R-7` and `r-7`, or `CAFÉ-1` and `CAFE-1`, are different keys, while an `É`
 * typed as one character or as `E` plus a combining accent is one. Every key is stored in this form, and
 * the key columns use the `utf8mb4_bin` collation, so MariaDB's unique keys decide exactly as this does.
 */
export function keyOf(raw: string): string {
  return raw.normalize('NFC').trim();
}
