import { Secret } from "otpauth";
import { describe, expect, it } from "vitest";
import { matchingStep, totp } from "~/.server/security/totp";

// RFC 6238, Appendix B: seeds are the ASCII strings below; T0 = 0, X = 30 s, 8 digits.
const seeds = {
  SHA1: "12345678901234567890",
  SHA256: "12345678901234567890123456789012",
  SHA512: "1234567890123456789012345678901234567890123456789012345678901234",
} as const;
const vectors: [number, string, keyof typeof seeds][] = [
  [59, "94287082", "SHA1"],
  [59, "46119246", "SHA256"],
  [59, "90693936", "SHA512"],
  [1111111109, "07081804", "SHA1"],
  [1111111109, "68084774", "SHA256"],
  [1111111109, "25091201", "SHA512"],
  [1111111111, "14050471", "SHA1"],
  [1111111111, "67062674", "SHA256"],
  [1111111111, "99943326", "SHA512"],
  [1234567890, "89005924", "SHA1"],
  [1234567890, "91819424", "SHA256"],
  [1234567890, "93441116", "SHA512"],
  [2000000000, "69279037", "SHA1"],
  [2000000000, "90698825", "SHA256"],
  [2000000000, "38618901", "SHA512"],
  [20000000000, "65353130", "SHA1"],
  [20000000000, "77737706", "SHA256"],
  [20000000000, "47863826", "SHA512"],
];

describe("TOTP against RFC 6238 appendix B", () => {
  it.each(vectors)("T=%i → %s (%s)", (t, code, algorithm) => {
    const secret = Secret.fromLatin1(seeds[algorithm]);
    expect(totp(secret, { algorithm, digits: 8 }).generate({ timestamp: t * 1000 })).toBe(code);
  });

  it("accepts a code one step either side of now and names its step; refuses others", () => {
    const secret = new Secret({ size: 20 }).base32;
    const now = 1_800_000_000_000;
    const step = Math.floor(now / 30_000);
    const at = (ms: number) => totp(secret).generate({ timestamp: ms });
    expect(matchingStep(secret, at(now), now)).toBe(step);
    expect(matchingStep(secret, at(now - 30_000), now)).toBe(step - 1);
    expect(matchingStep(secret, at(now + 30_000), now)).toBe(step + 1);
    expect(matchingStep(secret, at(now - 90_000), now)).toBeNull();
    expect(matchingStep(secret, "000000", now) === null || at(now) === "000000").toBe(true);
  });
});
