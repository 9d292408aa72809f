import { createColumnHelper } from "@tanstack/react-table";
import { useFetcher } from "react-router";
import { DataTable } from "~/components/data-table";
import { buttonClass } from "~/components/ui/button";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { User } from "~/.server/models";
import { formFailure } from "~/.server/replies";
import { changeRole } from "~/.server/services/role-changes";
import { formatDate } from "~/lib/format";
import { accepted, firstMessage, parseSubmission, refuse, roleChangeSchema, useSchemaForm } from "~/lib/forms";
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
  const submission = parseSubmission(await request.formData(), roleChangeSchema);
  if (submission.status !== "success") return refuse(submission);
  try {
    const user = await changeRole(admin, submission.value.userId, submission.value.role);
    // The select keeps the role just saved rather than resetting to the one the row was drawn with.
    return accepted(submission, `${user.name} is now ${user.role}.`, { reset: false });
  } catch (err) {
    return formFailure(err, submission, { field: "role" });
  }
}

type Row = Route.ComponentProps["loaderData"]["users"][number];
const column = createColumnHelper<Row>();

function RoleCell({ user, isMe }: { user: Row; isMe: boolean }) {
  const fetcher = useFetcher<typeof action>();
  const [form, fields] = useSchemaForm(roleChangeSchema, fetcher.data, { id: `role-of-${user.id}` });
  const pending = fetcher.formData?.get("role");
  const saved = fetcher.data && "message" in fetcher.data ? fetcher.data.message : undefined;
  const refused = firstMessage(fetcher.data);
  return (
    <fetcher.Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-wrap items-center gap-2">
      <input type="hidden" name={fields.userId.name} value={user.id} />
      <label className="sr-only" htmlFor={`role-${user.id}`}>
        Role of {user.name}
      </label>
      <select
        id={`role-${user.id}`}
        name={fields.role.name}
        defaultValue={user.role}
        aria-invalid={refused ? true : undefined}
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
      {(refused ?? saved) && (
        <span role="status" className={refused ? "text-xs text-brick" : "text-xs text-teal"}>
          {refused ?? saved}
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
