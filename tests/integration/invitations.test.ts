import { describe, expect, it } from "vitest";
import { CoachAthlete, Invitation, OutboundEmail, User } from "~/.server/models";
import * as invite from "~/routes/invite";
import * as roster from "~/routes/coach/roster";
import * as athletePage from "~/routes/coach/athlete";
import {
  cookieFrom,
  fieldErrorsOf,
  formRequest,
  getRequest,
  makeCoachWithAthlete,
  makeUser,
  payloadOf,
  run,
  signIn,
  statusOf,
  toastOf,
  uniqueEmail,
} from "./helpers";

async function inviteLink(email: string) {
  const mail = await OutboundEmail.findOne({
    where: { toAddress: email, template: "invitation" },
    order: [["id", "DESC"]],
  });
  const m = mail!.textBody.match(/\/invite\/([A-Za-z0-9_-]{43})/);
  return m![1];
}

describe("coach invites an athlete", () => {
  it("sends an e-mail, and the athlete accepts with a new account that joins the roster", async () => {
    const coach = await makeUser({ role: "coach", name: "Rae Coach" });
    const cookie = await signIn(coach.email);
    const email = uniqueEmail("newbie");
    const res = await run(roster.action, formRequest("/coach", { email, name: "Newbie Rider" }, { cookie }));
    expect(payloadOf(res)).toMatchObject({ status: "success", message: `Invitation sent to ${email}.` });
    const token = await inviteLink(email);

    const page = payloadOf(await run(invite.loader, getRequest(`/invite/${token}`), { token }));
    expect(page).toMatchObject({ valid: true, coachName: "Rae Coach", email, hasAccount: false });

    const short = await run(
      invite.action,
      formRequest(`/invite/${token}`, { name: "Newbie Rider", password: "short", timezone: "UTC" }),
      { token },
    );
    expect(statusOf(short)).toBe(400);
    expect(fieldErrorsOf(short).password).toMatch(/at least 10/);
    expect(await User.count({ where: { email } })).toBe(0);

    const accepted = await run(
      invite.action,
      formRequest(`/invite/${token}`, {
        name: "Newbie Rider",
        password: "newbie-password-1",
        timezone: "Europe/Paris",
      }),
      { token },
    );
    expect((accepted as Response).headers.get("location")).toBe("/athlete");
    expect((await toastOf(accepted as Response))?.message).toMatch(/You joined your coach's roster/);
    cookieFrom(accepted as Response);
    const athlete = await User.findOne({ where: { email } });
    expect(athlete).toMatchObject({ role: "athlete", timezone: "Europe/Paris" });
    expect(await CoachAthlete.count({ where: { coachId: coach.id, athleteId: athlete!.id } })).toBe(1);

    const list = payloadOf(await run(roster.loader, getRequest("/coach", cookie)));
    expect(list.athletes.map((a: { email: string }) => a.email)).toContain(email);
    expect(list.invitations).toHaveLength(0);

    // The link is single-use.
    const again = await run(
      invite.action,
      formRequest(`/invite/${token}`, { name: "X", password: "another-password", timezone: "UTC" }),
      { token },
    );
    expect(statusOf(again)).toBe(400);
  });

  it("refuses an invitation meant for another address and changes nothing", async () => {
    const coach = await makeUser({ role: "coach" });
    const invited = await makeUser({ role: "athlete" });
    const someoneElse = await makeUser({ role: "athlete" });
    const coachCookie = await signIn(coach.email);
    await run(roster.action, formRequest("/coach", { email: invited.email }, { cookie: coachCookie }));
    const token = await inviteLink(invited.email);

    const otherCookie = await signIn(someoneElse.email);
    const res = await run(invite.action, formRequest(`/invite/${token}`, { intent: "join" }, { cookie: otherCookie }), {
      token,
    });
    expect(statusOf(res)).toBe(400);
    expect(fieldErrorsOf(res).form).toMatch(/Sign in with that address/);
    expect(await CoachAthlete.count({ where: { coachId: coach.id } })).toBe(0);
    expect((await Invitation.findOne({ where: { email: invited.email } }))!.acceptedAt).toBeNull();

    // The right athlete, signed in, joins.
    const rightCookie = await signIn(invited.email);
    const ok = await run(invite.action, formRequest(`/invite/${token}`, { intent: "join" }, { cookie: rightCookie }), {
      token,
    });
    expect((ok as Response).status).toBe(302);
    expect(await CoachAthlete.count({ where: { coachId: coach.id, athleteId: invited.id } })).toBe(1);
  });

  it("validates the invite form and refuses to invite a coach or a current athlete", async () => {
    const { coach, athlete } = await makeCoachWithAthlete();
    const otherCoach = await makeUser({ role: "coach" });
    const cookie = await signIn(coach.email);
    const before = await OutboundEmail.count();
    expect(
      fieldErrorsOf(await run(roster.action, formRequest("/coach", { email: "nope" }, { cookie }))).email,
    ).toBeTruthy();
    expect(
      fieldErrorsOf(await run(roster.action, formRequest("/coach", { email: athlete.email }, { cookie }))).email,
    ).toMatch(/already on your roster/);
    expect(
      fieldErrorsOf(await run(roster.action, formRequest("/coach", { email: otherCoach.email }, { cookie }))).email,
    ).toMatch(/not an athlete/);
    expect(await OutboundEmail.count()).toBe(before);
  });

  it("shows a dead link for an expired invitation", async () => {
    const coach = await makeUser({ role: "coach" });
    const cookie = await signIn(coach.email);
    const email = uniqueEmail("late");
    await run(roster.action, formRequest("/coach", { email }, { cookie }));
    const token = await inviteLink(email);
    await Invitation.update({ expiresAt: new Date(Date.now() - 1) }, { where: { email } });
    expect(payloadOf(await run(invite.loader, getRequest(`/invite/${token}`), { token })).valid).toBe(false);
    const res = await run(
      invite.action,
      formRequest(`/invite/${token}`, { name: "Late", password: "late-password-1", timezone: "UTC" }),
      { token },
    );
    expect(statusOf(res)).toBe(400);
    expect(await User.count({ where: { email } })).toBe(0);
  });
});

describe("a coach's athletes are theirs alone", () => {
  it("answers 404 for another coach's athlete and for a made-up id", async () => {
    const { coach, athlete } = await makeCoachWithAthlete();
    const other = await makeCoachWithAthlete();
    const cookie = await signIn(coach.email);
    const mine = payloadOf(
      await run(athletePage.loader, getRequest(`/coach/athletes/${athlete.id}`, cookie), {
        athleteId: String(athlete.id),
      }),
    );
    expect(mine.athlete.name).toBe(athlete.name);
    expect(
      statusOf(
        await run(athletePage.loader, getRequest(`/coach/athletes/${other.athlete.id}`, cookie), {
          athleteId: String(other.athlete.id),
        }),
      ),
    ).toBe(404);
    expect(
      statusOf(await run(athletePage.loader, getRequest(`/coach/athletes/abc`, cookie), { athleteId: "abc" })),
    ).toBe(404);
  });

  it("saves an athlete's body details, and refuses a bad one beside its field without writing", async () => {
    const { coach, athlete } = await makeCoachWithAthlete();
    const cookie = await signIn(coach.email);
    const params = { athleteId: String(athlete.id) };
    const url = `/coach/athletes/${athlete.id}`;
    const bad = await run(
      athletePage.action,
      formRequest(url, { sex: "female", weightKg: "61", restingHr: "10", maxHr: "190" }, { cookie }),
      params,
    );
    expect(statusOf(bad)).toBe(400);
    expect(fieldErrorsOf(bad)).toEqual({ restingHr: "Resting heart rate must be between 25 and 120." });
    await athlete.reload();
    expect([athlete.sex, athlete.weightKg, athlete.restingHr]).toEqual([null, null, null]);

    const ok = await run(
      athletePage.action,
      formRequest(url, { sex: "female", weightKg: "61,5", restingHr: "48", maxHr: "" }, { cookie }),
      params,
    );
    expect(payloadOf(ok)).toMatchObject({ status: "success", message: "Saved." });
    await athlete.reload();
    expect([athlete.sex, athlete.weightKg, athlete.restingHr, athlete.maxHr]).toEqual(["female", 61.5, 48, null]);
  });
});
