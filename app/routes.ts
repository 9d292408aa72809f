import { index, layout, route, type RouteConfig } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("signup", "routes/signup.tsx"),
  route("login", "routes/login.tsx"),
  route("logout", "routes/logout.tsx"),
  route("forgot-password", "routes/forgot-password.tsx"),
  route("reset-password/:token", "routes/reset-password.tsx"),
  route("invite/:token", "routes/invite.tsx"),
  route("healthz", "routes/healthz.ts"),
  route("dev/mail", "routes/dev/mail.tsx"),
  route("api/sessions", "routes/api/sessions.ts"),

  layout("routes/app-layout.tsx", [
    route("coach", "routes/coach/roster.tsx"),
    route("coach/athletes/:athleteId", "routes/coach/athlete.tsx"),
    route("coach/sessions", "routes/coach/sessions.tsx"),
    route("coach/sessions/new", "routes/coach/session-edit.tsx", { id: "session-new" }),
    route("coach/sessions/:sessionId", "routes/coach/session-edit.tsx"),
    route("coach/plans", "routes/coach/plans.tsx"),
    route("coach/plans/new", "routes/coach/plan-new.tsx"),
    route("coach/plans/:planId", "routes/coach/plan.tsx"),
    route("athlete", "routes/athlete/today.tsx"),
    route("admin/users", "routes/admin/users.tsx"),
  ]),
] satisfies RouteConfig;
