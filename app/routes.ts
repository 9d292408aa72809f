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

  layout("routes/app-layout.tsx", [
    route("coach", "routes/coach/roster.tsx"),
    route("coach/athletes/:athleteId", "routes/coach/athlete.tsx"),
    route("athlete", "routes/athlete/today.tsx"),
    route("admin/users", "routes/admin/users.tsx"),
  ]),
] satisfies RouteConfig;
