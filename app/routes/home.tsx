import { Link } from "react-router";
import { Logo } from "~/components/logo";
import { buttonClass } from "~/components/ui/button";
import { getUser, homeFor } from "~/.server/auth";
import type { Route } from "./+types/home";

export const meta: Route.MetaFunction = () => [
  { title: "Pacewright · field tests and season plans that follow every threshold" },
  {
    name: "description",
    content:
      "For endurance coaches and their athletes: field tests become thresholds and intensity bands, season plans are written in percent of threshold, and every future target moves when a retest does.",
  },
];

// Public landing page; a signed-in visitor is only read to offer the way back to their own home.
export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  return { home: user ? homeFor(user.role) : null, name: user?.name ?? null };
}

const STEPS = [
  [
    "Test",
    "Ramp, 20-minute, 8-minute, critical-power efforts, a 30-minute heart-rate test, a race or a 400/200 m swim pair: typed in or found in a ride file.",
  ],
  [
    "Plan",
    "Drag sessions from your shelf onto the weeks of a season. Every target is a percentage of threshold, so one plan fits any athlete.",
  ],
  [
    "Follow",
    "Athletes see their own watts, bpm and paces on their phone calendar, and a retest rescales every future target at once.",
  ],
] as const;

export default function Home({ loaderData }: Route.ComponentProps) {
  return (
    <div className="min-h-screen">
      <header className="mx-auto flex max-w-6xl items-center justify-between px-4 py-5">
        <span className="flex items-center gap-2 text-xl font-semibold text-teal">
          <Logo /> Pacewright
        </span>
        <nav className="flex gap-2">
          {loaderData.home ? (
            <Link to={loaderData.home} className={buttonClass("primary")}>
              Go to my page
            </Link>
          ) : (
            <>
              <Link to="/login" className={buttonClass("ghost")}>
                Sign in
              </Link>
              <Link to="/signup" className={buttonClass("primary")}>
                Create an account
              </Link>
            </>
          )}
        </nav>
      </header>
      <main className="mx-auto max-w-6xl px-4 pb-16">
        <section className="grid items-center gap-10 py-10 md:grid-cols-[1.2fr_1fr] md:py-16">
          <div>
            <p className="text-sm font-medium tracking-wide text-brick uppercase">
              For endurance coaches and their athletes
            </p>
            <h1 className="mt-3 text-4xl leading-tight font-semibold sm:text-5xl">
              Plans written in percent of threshold. Targets that move when the athlete does.
            </h1>
            <p className="mt-5 max-w-xl text-lg text-ink-soft">
              Screen and test, turn results into thresholds and intensity bands, lay out a periodized season, and let
              every retest rescale what is still ahead.
            </p>
            {!loaderData.home && (
              <div className="mt-8 flex flex-wrap gap-3">
                <Link to="/signup" className={buttonClass("primary", "px-6 py-3 text-base")}>
                  Start as a coach
                </Link>
                <Link to="/login" className={buttonClass("secondary", "px-6 py-3 text-base")}>
                  I have an account
                </Link>
              </div>
            )}
          </div>
          <StepProfile />
        </section>
        <section aria-label="How it works" className="grid gap-4 md:grid-cols-3">
          {STEPS.map(([title, text], i) => (
            <article key={title} className="rounded-xl border border-line bg-white p-5">
              <p className="num text-sm text-brick">0{i + 1}</p>
              <h2 className="mt-1 text-lg font-semibold">{title}</h2>
              <p className="mt-2 text-sm text-ink-soft">{text}</p>
            </article>
          ))}
        </section>
        <p className="mt-10 max-w-3xl text-xs text-ink-soft">
          Pacewright gives training guidance, not medical advice. Maximal tests are hard on the body: screen before you
          test, stop at chest pain, dizziness or unusual breathlessness, and follow local regulations, your physician
          and licensed practice first.
        </p>
      </main>
    </div>
  );
}

/** A decorative session profile: block height is % of threshold, on our single-hue ramp. */
function StepProfile() {
  const blocks = [
    [10, 55, "var(--color-level-2)"],
    [6, 75, "var(--color-level-3)"],
    [8, 98, "var(--color-level-4)"],
    [3, 55, "var(--color-level-2)"],
    [8, 98, "var(--color-level-4)"],
    [3, 55, "var(--color-level-2)"],
    [4, 118, "var(--color-level-6)"],
    [8, 50, "var(--color-level-1)"],
  ] as const;
  const total = blocks.reduce((s, b) => s + b[0], 0);
  let x = 0;
  return (
    <svg
      viewBox="0 0 100 70"
      role="img"
      aria-label="Example session profile"
      className="w-full rounded-2xl border border-line bg-white p-4"
    >
      <line x1="0" x2="100" y1={66 - 50} y2={66 - 50} stroke="#B5523B" strokeDasharray="2 2" strokeWidth="0.4" />
      {blocks.map(([w, pct, fill], i) => {
        const width = (w / total) * 100;
        const h = (pct / 125) * 60;
        const rect = (
          <rect
            key={i}
            x={x}
            y={66 - h}
            width={width - 0.6}
            height={h}
            fill={fill}
            stroke={pct > 100 ? "#B5523B" : "none"}
            strokeWidth="0.6"
            rx="0.6"
          />
        );
        x += width;
        return rect;
      })}
    </svg>
  );
}
