import type { Block, Metric } from "~/lib/training";

export const PROTOCOL_KEYS = [
  "ramp",
  "twenty_minute",
  "eight_minute",
  "critical_power",
  "hr_thirty",
  "run_race",
  "swim_pair",
  "manual",
] as const;
export type ProtocolKey = (typeof PROTOCOL_KEYS)[number];

export interface Protocol {
  key: ProtocolKey;
  label: string;
  sports: ("bike" | "run" | "swim")[];
  metric: Metric;
  /** Maximal tests need the readiness screening first. */
  maximal: boolean;
  instructions: string;
  /** The session placed on a plan's test week. */
  session?: { name: string; blocks: Block[] };
}

const warm = (metric: Metric = "power"): Block => ({
  kind: "warmup",
  durationS: 900,
  target: { metric, lowPct: 50, highPct: 65 },
});
const cool = (metric: Metric = "power"): Block => ({
  kind: "cooldown",
  durationS: 600,
  target: { metric, lowPct: 45, highPct: 55 },
});

/** Our own test descriptions; each result becomes a threshold through the training engine. */
export const PROTOCOLS: Record<ProtocolKey, Protocol> = {
  ramp: {
    key: "ramp",
    label: "Ramp test",
    sports: ["bike"],
    metric: "power",
    maximal: true,
    instructions:
      "After an easy warm-up, power rises by the same step every minute, usually 20–25 W a minute in all. Keep pedalling until you cannot hold the step; your best minute sets the threshold (75 % of it). The 75 % rule is for ramps of that rate: give the rate with your result.",
    session: {
      name: "Ramp test",
      blocks: [
        { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 45, highPct: 55 } },
        { kind: "open", durationS: 1200, cue: "Ramp: +20 W every minute from 100 W until you stop" },
        cool(),
      ],
    },
  },
  twenty_minute: {
    key: "twenty_minute",
    label: "20-minute test",
    sports: ["bike"],
    metric: "power",
    maximal: true,
    instructions:
      "Warm up well, then ride 20 minutes as hard as you can hold evenly — start a little below what you think you can do. Threshold is 95 % of the 20-minute mean power.",
    session: {
      name: "20-minute field test",
      blocks: [
        warm(),
        {
          kind: "repeats",
          count: 3,
          work: { durationS: 60, target: { metric: "power", lowPct: 105, highPct: 110 } },
          recovery: { durationS: 60, target: { metric: "power", lowPct: 50 } },
        },
        { kind: "steady", durationS: 300, target: { metric: "power", lowPct: 50, highPct: 60 } },
        { kind: "open", durationS: 1200, cue: "20 minutes all-out, evenly paced" },
        cool(),
      ],
    },
  },
  eight_minute: {
    key: "eight_minute",
    label: "8-minute test",
    sports: ["bike"],
    metric: "power",
    maximal: true,
    instructions:
      "Two 8-minute all-out efforts with 10 minutes of easy riding between. Threshold is 90 % of their mean power.",
    session: {
      name: "8-minute field test",
      blocks: [
        warm(),
        {
          kind: "repeats",
          count: 2,
          work: { durationS: 480, target: { metric: "power", lowPct: 105, highPct: 120 } },
          recovery: { durationS: 600, target: { metric: "power", lowPct: 50 } },
        },
        cool(),
      ],
    },
  },
  critical_power: {
    key: "critical_power",
    label: "Critical power efforts",
    sports: ["bike"],
    metric: "power",
    maximal: true,
    instructions:
      "Two to four all-out efforts of different lengths between 2 and 20 minutes (for example 3 and 12 minutes), on the same day with full recovery or on separate fresh days. Critical power and W′ come from the line through their work and time.",
    session: {
      name: "Critical power: 3 and 12 minutes",
      blocks: [
        warm(),
        { kind: "open", durationS: 180, cue: "3 minutes all-out" },
        { kind: "steady", durationS: 1200, target: { metric: "power", lowPct: 45, highPct: 55 } },
        { kind: "open", durationS: 720, cue: "12 minutes all-out" },
        cool(),
      ],
    },
  },
  hr_thirty: {
    key: "hr_thirty",
    label: "30-minute heart-rate test",
    sports: ["bike", "run"],
    metric: "heart_rate",
    maximal: true,
    instructions:
      "Alone, after a warm-up, go as hard as you can hold for 30 minutes. Threshold heart rate is your mean heart rate over the last 20 minutes.",
    session: {
      name: "30-minute heart-rate test",
      blocks: [
        warm("heart_rate"),
        { kind: "open", durationS: 1800, cue: "30 minutes all-out, solo; heart rate recorded" },
        cool("heart_rate"),
      ],
    },
  },
  run_race: {
    key: "run_race",
    label: "Race result",
    sports: ["run"],
    metric: "pace",
    maximal: true,
    instructions:
      "A recent all-out race or time trial between 1500 m and the marathon. Its distance and time give a running index and from it a threshold pace.",
    session: {
      name: "5 km time trial",
      blocks: [warm("pace"), { kind: "open", durationS: 1500, cue: "5 km all-out" }, cool("pace")],
    },
  },
  swim_pair: {
    key: "swim_pair",
    label: "400 m + 200 m swim",
    sports: ["swim"],
    metric: "pace",
    maximal: true,
    instructions:
      "After a warm-up, swim 400 m all-out, rest fully, then 200 m all-out. Critical swim speed is the 200 m difference divided by the time difference.",
    session: {
      name: "Swim test: 400 m and 200 m",
      blocks: [
        warm("pace"),
        { kind: "open", durationS: 420, cue: "400 m all-out" },
        { kind: "open", durationS: 600, cue: "Easy swimming, full rest" },
        { kind: "open", durationS: 200, cue: "200 m all-out" },
        cool("pace"),
      ],
    },
  },
  manual: {
    key: "manual",
    label: "Enter a threshold",
    sports: ["bike", "run", "swim"],
    metric: "power",
    maximal: false,
    instructions: "Type a threshold you already know, for example from a lab test.",
  },
};

/** The test a plan's test weeks get for its sport. */
export function defaultTestFor(sport: string): Protocol {
  if (sport === "run") return PROTOCOLS.hr_thirty;
  if (sport === "swim") return PROTOCOLS.swim_pair;
  return PROTOCOLS.twenty_minute;
}

/** Readiness screening shown before any maximal test (DESIGN §10). */
export const READINESS = {
  questions: [
    "Has a doctor ever said you have a heart condition or high blood pressure?",
    "Do you feel pain in your chest at rest, in daily activities, or when you exercise?",
    "Do you lose balance from dizziness, or have you lost consciousness in the last 12 months?",
    "Do you have a bone, joint or muscle problem that hard exercise could make worse?",
    "Do you take medicine for a chronic condition, or are you unwell, injured or pregnant now?",
  ],
  yesAdvice:
    "You answered yes to at least one question. Before any maximal test, complete the PAR-Q+ screening and talk to a physician; follow local regulations and licensed practice.",
  stopSigns: [
    "chest pain, pressure or tightness",
    "dizziness or light-headedness",
    "unusual breathlessness",
    "palpitations or an irregular heartbeat",
    "nausea",
  ],
  stopAdvice:
    "Stop at once if any of these appear, and do not test while ill. Pacewright gives training guidance, not medical advice.",
};
