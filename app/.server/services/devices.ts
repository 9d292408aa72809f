import { Op } from "sequelize";
import { writeTransaction } from "../db";
import { SignInSession, type User } from "../models";

/** A short, human name for a browser from its user-agent string ("Firefox on Android"). */
export function deviceLabel(userAgent: string | null): string {
  if (!userAgent) return "Unknown device";
  const ua = userAgent;
  const browser = /Edg\//.test(ua)
    ? "Edge"
    : /Firefox\//.test(ua)
      ? "Firefox"
      : /Chrom(e|ium)\//.test(ua)
        ? "Chrome"
        : /Safari\//.test(ua)
          ? "Safari"
          : /curl|node|undici|python/i.test(ua)
            ? "Script"
            : "Browser";
  const os = /iPhone|iPad|iPod/.test(ua)
    ? "iOS"
    : /Android/.test(ua)
      ? "Android"
      : /Windows/.test(ua)
        ? "Windows"
        : /Mac OS X|Macintosh/.test(ua)
          ? "macOS"
          : /Linux|X11/.test(ua)
            ? "Linux"
            : null;
  return os ? `${browser} on ${os}` : browser;
}

/** The user's live sessions, newest first; `current` marks the one with the stored key `current` (this request's). */
export async function listDevices(user: User, current: string | null) {
  const rows = await SignInSession.findAll({
    where: { userId: user.id, expiresAt: { [Op.gt]: new Date() } },
    order: [["createdAt", "DESC"]],
  });
  return rows.map((r) => ({
    // The stored id is a hash of the cookie's secret, so showing it gives nobody a way in.
    handle: r.id,
    label: deviceLabel(r.userAgent),
    signedInAt: r.createdAt.toISOString(),
    lastSeenAt: (r.lastSeenAt ?? r.createdAt).toISOString(),
    current: r.id === current,
  }));
}

/** Ends one of the user's own sessions; another user's handle finds nothing (false). */
export async function signOutDevice(user: User, handle: string): Promise<boolean> {
  const n = await writeTransaction((transaction) =>
    SignInSession.destroy({ where: { id: handle, userId: user.id }, transaction }),
  );
  return n > 0;
}

/** Ends every session of the user except the one with the stored key `current`; answers how many ended. */
export async function signOutEverywhereElse(user: User, current: string | null): Promise<number> {
  return writeTransaction((transaction) =>
    SignInSession.destroy({
      where: { userId: user.id, ...(current ? { id: { [Op.ne]: current } } : {}) },
      transaction,
    }),
  );
}
