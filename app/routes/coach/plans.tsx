import { createColumnHelper } from "@tanstack/react-table";
import { Link } from "react-router";
import { DataTable } from "~/components/data-table";
import { PhaseRibbon } from "~/components/phase-ribbon";
import { buttonClass } from "~/components/ui/button";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { listPlans } from "~/.server/services/plans";
import type { Route } from "./+types/plans";

export const meta: Route.MetaFunction = () => [{ title: "Season plans · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const rows = await listPlans(coach.id);
  return {
    plans: rows.map((r) => ({
      id: r.id,
      name: r.name,
      sport: r.sport,
      eventDate: r.event_date,
      startDate: r.start_date,
      weeks: Number(r.weeks),
      sessions: Number(r.sessions),
      athletes: Number(r.athletes),
      listed: Number(r.listed) > 0,
      phases: (r.phases ?? "").split(",").filter(Boolean),
    })),
  };
}

type Row = Route.ComponentProps["loaderData"]["plans"][number];
const column = createColumnHelper<Row>();

export default function Plans({ loaderData }: Route.ComponentProps) {
  const columns = [
    column.accessor("name", {
      header: "Plan",
      cell: (c) => (
        <Link to={`/coach/plans/${c.row.original.id}`} className="font-medium text-teal hover:underline">
          {c.getValue()}
        </Link>
      ),
    }),
    column.accessor("weeks", { header: "Weeks" }),
    column.display({
      id: "phases",
      header: "Phases",
      cell: (c) => (
        <PhaseRibbon
          weeks={c.row.original.phases.map((phase, i) => ({ idx: i + 1, phase, recovery: false, test: false }))}
          className="w-48 [&_ul]:hidden"
        />
      ),
    }),
    column.accessor("sessions", { header: "Sessions" }),
    column.accessor("athletes", { header: "Athletes" }),
    column.accessor("listed", { header: "For sale", cell: (c) => (c.getValue() ? "Listed" : "—") }),
    column.accessor((r) => r.eventDate ?? r.startDate ?? "", {
      id: "date",
      header: "Event / start",
      cell: (c) => c.getValue() || "—",
    }),
    column.display({
      id: "board",
      header: "",
      cell: (c) => (
        <Link to={`/coach/plans/${c.row.original.id}/board`} className={buttonClass("secondary", "px-3 py-1")}>
          Board
        </Link>
      ),
    }),
  ];
  return (
    <>
      <PageHeader
        title="Season plans"
        lead="Periodized plans whose targets are percentages of threshold."
        actions={
          <Link to="/coach/plans/new" className={buttonClass("primary")}>
            New season plan
          </Link>
        }
      />
      <DataTable
        data={loaderData.plans}
        columns={columns}
        caption="Your season plans"
        empty="No plans yet. Create one from an event date."
      />
    </>
  );
}
