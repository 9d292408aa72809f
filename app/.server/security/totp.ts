import { Secret, TOTP } from "otpauth";

/**
 * Time-based one-time codes (RFC 6238) as authenticator apps read them: HMAC-SHA1, 6 digits, 30-second steps from
 * the Unix epoch. The algorithm and digit count are parameters only so the RFC's own test vectors can be checked.
 */
export const TOTP_PERIOD_S = 30;

export function totp(
  secret: Secret | string,
  opts: { label?: string; algorithm?: "SHA1" | "SHA256" | "SHA512"; digits?: number } = {},
) {
  return new TOTP({
    issuer: "Pacewright",
    label: opts.label ?? "Pacewright",
    algorithm: opts.algorithm ?? "SHA1",
    digits: opts.digits ?? 6,
    period: TOTP_PERIOD_S,
    secret: typeof secret === "string" ? Secret.fromBase32(secret) : secret,
  });
}

/** A new random secret (160 bits, the size RFC 4226 recommends), base32 as apps expect it. */
export const newTotpSecret = () => new Secret({ size: 20 }).base32;

/**
 * The time step a code belongs to, when it matches within one step either side (clock drift), else null.
 * Callers refuse a step at or before the last one accepted, so a code works once.
 */
export function matchingStep(secret: string, code: string, timestampMs = Date.now()): number | null {
  const delta = totp(secret).validate({ token: code, timestamp: timestampMs, window: 1 });
  if (delta === null) return null;
  return Math.floor(timestampMs / 1000 / TOTP_PERIOD_S) + delta;
}
