import { Op } from "sequelize";
import { hashPassword } from "../auth";
import { writeTransaction } from "../db";
import { env } from "../env";
import { DomainError } from "../errors";
import { queueEmail } from "../mail";
import { CoachAthlete, Invitation, User } from "../models";
import { hashToken, looksLikeToken, newToken } from "../tokens";
import { INVITE_DEAD } from "~/lib/messages";

export const INVITE_TTL_MS = 7 * 24 * 60 * 60 * 1000;

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
