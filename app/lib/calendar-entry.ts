/**
 * One scheduled session as the athlete's calendar pages draw it (week and month views, the feed's list), with its
 * targets already resolved against the threshold in force on its date. Server and components share this one shape.
 */
export interface CalendarEntry {
  id: number;
  date: string;
  position: number;
  timeOfDay: string | null;
  name: string;
  sport: string;
  status: string;
  testProtocol: string | null;
  plannedDurationS: number;
  plannedLoad: number;
  effortScore: number | null;
  keyTarget: string;
  needsTest: boolean;
  lines: string[];
}
