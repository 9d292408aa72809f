/**
 * The demo scenario: an invented coaching studio. Names, addresses and numbers are made up for the demo and
 * for the browser tests; the .example domain is reserved and never receives mail.
 */
export const DEMO_ACCOUNTS = {
  password: "harbour-line-demo",
  studio: "Harbour Line Endurance",
  people: [
    { key: "admin", role: "admin", name: "Iris Vance", email: "admin@harbourline.example", timezone: "Europe/Berlin" },
    {
      key: "coach",
      role: "coach",
      name: "Mara Lindqvist",
      email: "coach@harbourline.example",
      timezone: "Europe/Berlin",
    },
    {
      key: "cyclist",
      role: "athlete",
      name: "Tomás Reyes",
      email: "tomas@harbourline.example",
      timezone: "Europe/Madrid",
      sex: "male",
      weightKg: 71,
      restingHr: 48,
      maxHr: 188,
    },
    {
      key: "triathlete",
      role: "athlete",
      name: "Ada Okafor",
      email: "ada@harbourline.example",
      timezone: "Europe/London",
      sex: "female",
      weightKg: 60,
      restingHr: 52,
      maxHr: 186,
    },
    {
      key: "runner",
      role: "athlete",
      name: "Jonah Pike",
      email: "jonah@harbourline.example",
      timezone: "America/New_York",
      sex: "male",
      weightKg: 66,
      restingHr: 45,
      maxHr: 192,
    },
  ],
} as const;

export type DemoKey = (typeof DEMO_ACCOUNTS.people)[number]["key"];
