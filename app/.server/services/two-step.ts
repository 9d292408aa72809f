import crypto from "node:crypto";
import QRCode from "qrcode";
import { writeTransaction } from "../db";
import { RecoveryCode, StudioSetting, User } from "../models";
import { matchingStep, newTotpSecret, totp } from "../security/totp";
import { DomainError } from "../errors";
import { twoStepOn } from "../auth";

export { twoStepOn };

export const RECOVERY_CODE_COUNT = 10;
const REQUIRED_KEY = "two_step_required_for_staff";
const STAFF = new Set(["coach", "admin"]);

const hashCode = (code: string) =>
  crypto.createHash("sha256").update(code.replace(/[\s-]/g, "").toLowerCase()).digest("hex");

/** Ten characters from an alphabet without look-alikes, shown as xxxxx-xxxxx. */
function newRecoveryCode() {
  const alphabet = "abcdefghjkmnpqrstuvwxyz23456789";
  const bytes = crypto.randomBytes(10);
  const chars = [...bytes].map((b) => alphabet[b % alphabet.length]).join("");
  return `${chars.slice(0, 5)}-${chars.slice(5)}`;
}

export async function twoStepRequiredForStaff(): Promise<boolean> {
  return (await StudioSetting.findByPk(REQUIRED_KEY))?.value === "true";
}

export async function setTwoStepRequiredForStaff(required: boolean) {
  await writeTransaction((transaction) =>
    StudioSetting.upsert({ key: REQUIRED_KEY, value: String(required) }, { transaction }),
  );
}

/** A coach or admin in a studio that requires two-step sign-in, who has not set it up yet. */
export async function mustEnrol(user: User) {
  return STAFF.has(user.role) && !twoStepOn(user) && (await twoStepRequiredForStaff());
}

/** Starts (or restarts) enrolment: a new secret, not yet in force, with the QR code an authenticator app scans. */
export async function startEnrolment(user: User) {
  if (!STAFF.has(user.role)) throw new DomainError("invalid", "Two-step sign-in is for coach and admin accounts.");
  if (twoStepOn(user))
    throw new DomainError("invalid", "Two-step sign-in is already on. Turn it off first to set up a new app.");
  const secret = newTotpSecret();
  await writeTransaction((transaction) =>
    User.update(
      { totpSecret: secret, totpEnabledAt: null, totpLastStep: null },
      { where: { id: user.id }, transaction },
    ),
  );
  user.totpSecret = secret;
  return enrolmentView(user);
}

export async function enrolmentView(user: User) {
  if (!user.totpSecret || twoStepOn(user)) return null;
  const uri = totp(user.totpSecret, { label: user.email }).toString();
  return {
    secret: user.totpSecret,
    uri,
    qrSvg: await QRCode.toString(uri, { type: "svg", margin: 1, color: { dark: "#1B2330", light: "#FFFFFF" } }),
  };
}

/** Turns two-step sign-in on once the app shows a matching code; answers the recovery codes, shown this once. */
export async function confirmEnrolment(user: User, code: string): Promise<string[]> {
  if (!user.totpSecret || twoStepOn(user)) throw new DomainError("invalid", "Start the set-up again.");
  const step = matchingStep(user.totpSecret, code.replace(/\s/g, ""));
  if (step === null)
    throw new DomainError(
      "invalid",
      "That code does not match. Check the time on your phone and enter the newest code.",
    );
  const codes = Array.from({ length: RECOVERY_CODE_COUNT }, newRecoveryCode);
  await writeTransaction(async (transaction) => {
    await User.update({ totpEnabledAt: new Date(), totpLastStep: step }, { where: { id: user.id }, transaction });
    await RecoveryCode.destroy({ where: { userId: user.id }, transaction });
    await RecoveryCode.bulkCreate(
      codes.map((c) => ({ userId: user.id, codeHash: hashCode(c) })),
      { transaction },
    );
  });
  return codes;
}

/** Turns two-step sign-in off after a current code or a recovery code; not while the studio requires it. */
export async function disableTwoStep(user: User, code: string) {
  if (STAFF.has(user.role) && (await twoStepRequiredForStaff()))
    throw new DomainError("invalid", "Your studio requires two-step sign-in for coaches and admins.");
  if (!(await verifySecondStep(user, code))) throw new DomainError("invalid", "That code does not match.");
  await writeTransaction(async (transaction) => {
    await User.update(
      { totpSecret: null, totpEnabledAt: null, totpLastStep: null },
      { where: { id: user.id }, transaction },
    );
    await RecoveryCode.destroy({ where: { userId: user.id }, transaction });
  });
}

/**
 * Checks a second-step code: a six-digit code from the app (each time step once only), or an unused recovery code,
 * which is spent. Both spends are conditional updates, so two parallel requests cannot use one code twice.
 */
export async function verifySecondStep(user: User, input: string): Promise<boolean> {
  const code = input.trim();
  if (!user.totpSecret || !user.totpEnabledAt) return false;
  if (/^\d{6}$/.test(code.replace(/\s/g, ""))) {
    const step = matchingStep(user.totpSecret, code.replace(/\s/g, ""));
    if (step === null) return false;
    const [n] = await writeTransaction(async (transaction) => {
      const fresh = await User.findByPk(user.id, { transaction });
      if (fresh?.totpLastStep != null && step <= fresh.totpLastStep) return [0];
      return User.update({ totpLastStep: step }, { where: { id: user.id }, transaction });
    });
    return n === 1;
  }
  if (!/^[a-z0-9]{5}-?[a-z0-9]{5}$/i.test(code)) return false;
  const [n] = await writeTransaction((transaction) =>
    RecoveryCode.update(
      { usedAt: new Date() },
      { where: { userId: user.id, codeHash: hashCode(code), usedAt: null }, transaction },
    ),
  );
  return n === 1;
}

export async function recoveryCodesLeft(user: User) {
  return RecoveryCode.count({ where: { userId: user.id, usedAt: null } });
}
