import { hashPassword } from "../auth";
import { writeTransaction } from "../db";
import { env } from "../env";
import { DomainError } from "../errors";
import { queueEmail } from "../mail";
import { SignInSession, PasswordReset, User } from "../models";
import { hashToken, looksLikeToken, newToken } from "../tokens";
import { RESET_LINK_DEAD } from "~/lib/messages";

export const RESET_TTL_MS = 60 * 60 * 1000;

/**
 * Always behaves the same for known and unknown addresses, so the form cannot be used to find out who has an account.
 */
export async function requestPasswordReset(email: string): Promise<void> {
  await writeTransaction(async (transaction) => {
    const user = await User.findOne({ where: { email }, transaction });
    if (!user) return;
    const token = newToken();
    await PasswordReset.create(
      { userId: user.id, tokenHash: hashToken(token), expiresAt: new Date(Date.now() + RESET_TTL_MS) },
      { transaction },
    );
    await queueEmail(
      {
        to: user.email,
        template: "password-reset",
        vars: { name: user.name, link: `${env().appUrl}/reset-password/${token}` },
      },
      transaction,
    );
  });
}

async function usableReset(token: string | undefined) {
  if (!looksLikeToken(token)) return null;
  const reset = await PasswordReset.findOne({ where: { tokenHash: hashToken(token) } });
  if (!reset || reset.usedAt || reset.expiresAt.getTime() <= Date.now()) return null;
  return reset;
}

export async function checkResetToken(token: string | undefined): Promise<boolean> {
  return (await usableReset(token)) !== null;
}

/** Sets the new password, spends the token, and signs out every existing session of that account. */
export async function resetPassword(token: string | undefined, password: string): Promise<User> {
  if (!looksLikeToken(token)) throw new DomainError("invalid", RESET_LINK_DEAD);
  const passwordHash = await hashPassword(password);
  return writeTransaction(async (transaction) => {
    const reset = await PasswordReset.findOne({ where: { tokenHash: hashToken(token) }, transaction });
    if (!reset || reset.usedAt || reset.expiresAt.getTime() <= Date.now())
      throw new DomainError("invalid", RESET_LINK_DEAD);
    const [spent] = await PasswordReset.update(
      { usedAt: new Date() },
      { where: { id: reset.id, usedAt: null }, transaction },
    );
    if (spent !== 1) throw new DomainError("invalid", RESET_LINK_DEAD);
    const user = await User.findByPk(reset.userId, { transaction });
    if (!user) throw new DomainError("invalid", RESET_LINK_DEAD);
    user.passwordHash = passwordHash;
    await user.save({ transaction });
    await SignInSession.destroy({ where: { userId: user.id }, transaction });
    return user;
  });
}
