import { Op } from "sequelize";
import { hashPassword } from "../auth";
import { writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { SignInSession, CoachAthlete, Invitation, PasswordReset, User, type Role } from "../models";
import { hashToken, looksLikeToken, newToken } from "../tokens";
import { INVITE_DEAD, RESET_LINK_DEAD } from "~/lib/messages";
import { copyStarterShelf } from "./shelf";
import { DomainError } from "../errors";

export const RESET_TTL_MS = 60 * 60 * 1000;
export const INVITE_TTL_MS = 7 * 24 * 60 * 60 * 1000;

export async function signUp(input: {
  name: string;
  email: string;
  password: string;
  role: Extract<Role, "coach" | "athlete">;
  timezone: string;
}): Promise<User> {
  const passwordHash = await hashPassword(input.password);
  return writeTransaction(async (transaction) => {
    const taken = await User.findOne({ where: { email: input.email }, transaction });
    if (taken)
      throw new DomainError("invalid", "An account with this e-mail already exists. Sign in or reset your password.", {
        field: "email",
      });
    const user = await User.create(
      { name: input.name, email: input.email, passwordHash, role: input.role, timezone: input.timezone },
      { transaction },
    );
    // A new coach starts with something on the shelf to drag onto a plan.
    if (user.role === "coach") await copyStarterShelf(user.id, transaction);
    return user;
  });
}

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

export async function inviteAthlete(coach: User, input: { email: string; name: string }) {
  return writeTransaction(async (transaction) => {
    const existing = await User.findOne({ where: { email: input.email }, transaction });
    if (existing) {
      const linked = await CoachAthlete.findOne({ where: { coachId: coach.id, athleteId: existing.id }, transaction });
      if (linked) throw new DomainError("invalid", "This athlete is already on your roster.", { field: "email" });
      if (existing.role !== "athlete")
        throw new DomainError("invalid", "This address belongs to a coach or admin account, not an athlete.", {
          field: "email",
        });
    }
    const pending = await Invitation.findOne({
      where: { coachId: coach.id, email: input.email, acceptedAt: null, expiresAt: { [Op.gt]: new Date() } },
      transaction,
    });
    const token = newToken();
    if (pending) {
      // Sending again replaces the old link, so only the newest e-mail works.
      pending.tokenHash = hashToken(token);
      pending.expiresAt = new Date(Date.now() + INVITE_TTL_MS);
      if (input.name) pending.name = input.name;
      await pending.save({ transaction });
    } else {
      await Invitation.create(
        {
          coachId: coach.id,
          email: input.email,
          name: input.name || null,
          tokenHash: hashToken(token),
          expiresAt: new Date(Date.now() + INVITE_TTL_MS),
        },
        { transaction },
      );
    }
    await queueEmail(
      {
        to: input.email,
        template: "invitation",
        vars: {
          coachName: coach.name,
          athleteName: input.name || existing?.name || "there",
          link: `${env().appUrl}/invite/${token}`,
        },
      },
      transaction,
    );
  });
}

export async function findInvitation(token: string | undefined) {
  if (!looksLikeToken(token)) return null;
  const invitation = await Invitation.findOne({ where: { tokenHash: hashToken(token) } });
  if (!invitation || invitation.acceptedAt || invitation.expiresAt.getTime() <= Date.now()) return null;
  const coach = await User.findByPk(invitation.coachId);
  if (!coach) return null;
  const existing = await User.findOne({ where: { email: invitation.email } });
  return { invitation, coach, existing };
}

/**
 * Accepts an invitation. A new address gets an athlete account; an existing athlete must be signed in as that
 * same address, so a forwarded link cannot attach someone else's account to a coach.
 */
export async function acceptInvitation(
  token: string | undefined,
  opts: { signedIn: User | null; newAccount?: { name: string; password: string; timezone: string } },
): Promise<User> {
  if (!looksLikeToken(token)) throw new DomainError("invalid", INVITE_DEAD);
  const passwordHash = opts.newAccount ? await hashPassword(opts.newAccount.password) : null;
  return writeTransaction(async (transaction) => {
    const invitation = await Invitation.findOne({ where: { tokenHash: hashToken(token) }, transaction });
    if (!invitation || invitation.acceptedAt || invitation.expiresAt.getTime() <= Date.now())
      throw new DomainError("invalid", INVITE_DEAD);
    let athlete = await User.findOne({ where: { email: invitation.email }, transaction });
    if (athlete) {
      if (!opts.signedIn || opts.signedIn.id !== athlete.id)
        throw new DomainError(
          "invalid",
          `This invitation is for ${invitation.email}. Sign in with that address to accept it.`,
        );
      if (athlete.role !== "athlete")
        throw new DomainError("invalid", "Only athlete accounts can join a coach's roster.");
    } else {
      if (opts.signedIn)
        throw new DomainError(
          "invalid",
          `This invitation is for ${invitation.email}, but you are signed in as ${opts.signedIn.email}. Sign out first.`,
        );
      if (!opts.newAccount || !passwordHash)
        throw new DomainError("invalid", "Choose a name and a password to accept.");
      athlete = await User.create(
        {
          name: opts.newAccount.name,
          email: invitation.email,
          passwordHash,
          role: "athlete",
          timezone: opts.newAccount.timezone,
        },
        { transaction },
      );
    }
    const [accepted] = await Invitation.update(
      { acceptedAt: new Date(), acceptedUserId: athlete.id },
      { where: { id: invitation.id, acceptedAt: null }, transaction },
    );
    if (accepted !== 1) throw new DomainError("invalid", INVITE_DEAD);
    await CoachAthlete.findOrCreate({
      where: { coachId: invitation.coachId, athleteId: athlete.id },
      defaults: { coachId: invitation.coachId, athleteId: athlete.id },
      transaction,
    });
    return athlete;
  });
}

/** The coach's roster: linked athletes and invitations still open. */
// The roster is read set-based in its own module; kept reachable from here for the pages that import it.
export { rosterFor } from "./roster";

export async function changeRole(admin: User, userId: number, role: Role) {
  if (admin.id === userId && role !== "admin")
    throw new DomainError("invalid", "You cannot remove your own admin role; ask another admin.", { field: "role" });
  return writeTransaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction });
    if (!user) throw new DomainError("invalid", "That user no longer exists.");
    user.role = role;
    await user.save({ transaction });
    return user;
  });
}
