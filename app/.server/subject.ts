import { requireRole } from "./auth";
import type { User } from "./models";
import { calendarSubject } from "./services/calendar";

/**
 * Pages shared by athletes and coaches: under /coach/athletes/:athleteId a coach acts for one of their athletes
 * (404 for anyone else's); elsewhere an athlete acts for themselves.
 */
export async function athleteSubject(request: Request, athleteIdParam?: string): Promise<{ viewer: User; athlete: User; base: string }> {
  if (athleteIdParam !== undefined) {
    const coach = await requireRole(request, "coach");
    const athlete = await calendarSubject(coach, athleteIdParam);
    return { viewer: coach, athlete, base: `/coach/athletes/${athlete.id}` };
  }
  const athlete = await requireRole(request, "athlete");
  return { viewer: athlete, athlete, base: "/athlete" };
}
