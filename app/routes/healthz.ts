import { db } from "~/.server/db";

// Public by design: load balancers and the test harness poll it; it reveals nothing but "up".
export async function loader() {
  await db().query("SELECT 1");
  return Response.json({ ok: true }, { headers: { "Cache-Control": "no-store" } });
}
