import { createHmac, timingSafeEqual } from 'node:crypto';

/**
 * Ballast's webhook signature. Each request carries
 *   Ballast-Timestamp: <Unix time in whole seconds when this attempt was sent>
 *   Ballast-Signature: v1=<lower-case hex HMAC-SHA256 of "<timestamp>.<raw body>" keyed with the secret>
 * A receiver recomputes the HMAC over the exact bytes it received, compares in constant time, and refuses
 * a timestamp more than five minutes from its own clock (a replayed old request).
 */
export const timestampHeader = 'Ballast-Timestamp';
export const signatureHeader = 'Ballast-Signature';
export const eventHeader = 'Ballast-Event';
export const toleranceSeconds = 300;

export function signPayload(secret: string, timestamp: number, body: string): string {
  return `v1=${createHmac('sha256', secret).update(`${timestamp}.${body}`).digest('hex')}`;
}

export type Verdict = 'verified' | 'unsigned' | 'bad_signature' | 'stale_timestamp' | 'unknown_receiver';

export const verdictText: Record<Verdict, string> = {
  verified: 'Signature verified',
  unsigned: 'No signature or timestamp',
  bad_signature: 'Signature does not match',
  stale_timestamp: 'Timestamp more than five minutes off',
  unknown_receiver: 'No webhook registered for this address',
};

export function verifySignature(
  secrets: string[],
  timestamp: string | undefined,
  signature: string | undefined,
  body: string,
  nowMs: number,
): Verdict {
  if (!timestamp || !signature) return 'unsigned';
  if (secrets.length === 0) return 'unknown_receiver';
  const ts = Number(timestamp);
  if (!/^\d{1,12}$/.test(timestamp) || Math.abs(nowMs / 1000 - ts) > toleranceSeconds)
    return 'stale_timestamp';
  const given = Buffer.from(signature);
  for (const secret of secrets) {
    const expected = Buffer.from(signPayload(secret, ts, body));
    if (expected.length === given.length && timingSafeEqual(expected, given)) return 'verified';
  }
  return 'bad_signature';
}
