/** Our own words for the 0–10 effort score (session-RPE method: score × minutes = effort load). */
export const EFFORT_WORDS = [
  "Rest",
  "Barely moving",
  "Very easy",
  "Easy",
  "Comfortable",
  "Steady",
  "Firm",
  "Hard",
  "Very hard",
  "Near my limit",
  "Everything I had",
] as const;
