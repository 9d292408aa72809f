import { createColumnHelper } from "@tanstack/react-table";
import { data, useFetcher } from "react-router";
import { DataTable } from "~/components/data-table";
import { buttonClass } from "~/components/ui/button";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { User } from "~/.server/models";
import { pageFailure } from "~/.server/replies";
import { changeRole } from "~/.server/services/role-changes";
import { formatDate } from "~/lib/format";
import { parseForm, roleChangeSchema } from "~/lib/forms";
import { ROLES } from "~/lib/roles";
import type { Route } from "./+types/users";

export const meta: Route.MetaFunction = () => [{ title: "Users · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const admin = await requireRole(request, "admin");
  const users = await User.findAll({ order: [["createdAt", "ASC"]] });
  return {
    meId: admin.id,
    timezone: admin.timezone,
    users: users.map((u) => ({
      id: u.id,
      name: u.name,
      email: u.email,
      role: u.role,
      createdAt: u.createdAt.toISOString(),
    })),
  };
}

export async function action({ request }: Route.ActionArgs) {
  const admin = await requireRole(request, "admin");
  const parsed = parseForm(roleChangeSchema, await request.formData());
  if (!parsed.ok)
    return data(
      { ok: false as const, error: Object.values(parsed.fieldErrors)[0] ?? "Invalid request." },
      { status: 400 },
    );
  try {
    const user = await changeRole(admin, parsed.data.userId, parsed.data.role);
    return { ok: true as const, message: `${user.name} is now ${user.role}.` };
  } catch (err) {
    return pageFailure(err, (e) => ({ ok: false as const, error: e.message }));
  }
}

type Row = Route.ComponentProps["loaderData"]["users"][number];
const column = createColumnHelper<Row>();

function RoleCell({ user, isMe }: { user: Row; isMe: boolean }) {
  const fetcher = useFetcher<typeof action>();
  const pending = fetcher.formData?.get("role");
  return (
    <fetcher.Form method="post" className="flex flex-wrap items-center gap-2">
      <input type="hidden" name="userId" value={user.id} />
      <label className="sr-only" htmlFor={`role-${user.id}`}>
        Role of {user.name}
      </label>
      <select
        id={`role-${user.id}`}
        name="role"
        defaultValue={user.role}
        disabled={isMe}
        className="rounded-md border border-line bg-white px-2 py-1"
      >
        {ROLES.map((r) => (
          <option key={r} value={r}>
            {r}
          </option>
        ))}
      </select>
      {!isMe && (
        <button type="submit" className={buttonClass("secondary", "px-3 py-1")} disabled={fetcher.state !== "idle"}>
          {pending ? "Saving…" : "Save"}
        </button>
      )}
      {fetcher.data && (
        <span role="status" className={fetcher.data.ok ? "text-xs text-teal" : "text-xs text-brick"}>
          {fetcher.data.ok ? fetcher.data.message : fetcher.data.error}
        </span>
      )}
    </fetcher.Form>
  );
}

export default function AdminUsers({ loaderData }: Route.ComponentProps) {
  const { users, meId, timezone } = loaderData;
  const columns = [
    column.accessor("name", { header: "Name" }),
    column.accessor("email", { header: "E-mail" }),
    column.accessor("createdAt", { header: "Joined", cell: (c) => formatDate(c.getValue(), timezone) }),
    column.accessor("role", {
      header: "Role",
      cell: (c) => <RoleCell user={c.row.original} isMe={c.row.original.id === meId} />,
    }),
  ];
  return (
    <>
      <PageHeader title="Users" lead="Every account, and the role that decides what it can open." />
      <DataTable data={users} columns={columns} caption="All users" empty="No users." />
    </>
  );
}
