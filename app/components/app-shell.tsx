import { useState } from "react";
import { Form, NavLink, Link, useLocation, useMatches } from "react-router";
import type { Role } from "~/lib/roles";
import { Logo } from "./logo";

const NAV: Record<Role, { to: string; label: string; end?: boolean }[]> = {
  coach: [
    { to: "/coach", label: "Roster", end: true },
    { to: "/coach/sessions", label: "Session shelf" },
    { to: "/coach/plans", label: "Season plans" },
    { to: "/coach/shop", label: "Selling" },
    { to: "/coach/bands", label: "Bands" },
    { to: "/coach/feed", label: "Calendar feed" },
  ],
  athlete: [
    { to: "/athlete", label: "Today", end: true },
    { to: "/athlete/calendar", label: "Calendar" },
    { to: "/athlete/tests", label: "Field tests" },
    { to: "/athlete/load", label: "Load" },
    { to: "/athlete/uploads", label: "Ride files" },
    { to: "/athlete/feed", label: "Calendar feed" },
    { to: "/shop", label: "Plan shop" },
  ],
  admin: [
    { to: "/admin/users", label: "Users" },
    { to: "/coach/shop", label: "Orders" },
  ],
};

export function AppShell({
  user,
  devMail,
  children,
}: {
  user: { name: string; role: Role; email: string };
  devMail: boolean;
  children: React.ReactNode;
}) {
  // Pages that need the whole width (the plan board) say so in their route handle.
  const wide = useMatches().some((m) => (m.handle as { wide?: boolean } | undefined)?.wide);
  // Below the large breakpoint the links do not fit on one line; they fold into a menu that closes on navigation.
  // The menu is open for the page it was opened on, so any navigation closes it.
  const { pathname } = useLocation();
  const [openOn, setOpenOn] = useState<string | null>(null);
  const menuOpen = openOn === pathname;
  const setMenuOpen = (open: boolean | ((was: boolean) => boolean)) =>
    setOpenOn((typeof open === "function" ? open(menuOpen) : open) ? pathname : null);
  return (
    <div className="min-h-screen">
      <header className="border-b border-line bg-white/80 backdrop-blur print:hidden">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-3 gap-y-2 px-4 py-3 lg:gap-x-6">
          <Link to="/" className="flex items-center gap-2 font-semibold text-teal">
            <Logo className="h-7 w-7" /> Pacewright
          </Link>
          <button
            type="button"
            className="ml-auto rounded-md border border-line px-3 py-1.5 text-sm font-medium lg:hidden"
            aria-expanded={menuOpen}
            aria-controls="main-nav"
            onClick={() => setMenuOpen((o) => !o)}
          >
            Menu
          </button>
          <nav
            id="main-nav"
            aria-label="Main"
            className={`${menuOpen ? "flex" : "hidden"} order-last w-full flex-col gap-1 lg:order-none lg:flex lg:w-auto lg:flex-1 lg:flex-row`}
          >
            {NAV[user.role].map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                end={item.end}
                onClick={() => setMenuOpen(false)}
                className={({ isActive }) =>
                  `rounded-md px-3 py-1.5 text-sm font-medium whitespace-nowrap ${isActive ? "bg-teal text-paper" : "text-ink hover:bg-paper-deep"}`
                }
              >
                {item.label}
              </NavLink>
            ))}
            {/* Where the name (the link to sign-in and devices) does not fit in the bar, the menu carries it. */}
            <NavLink
              to="/account/security"
              onClick={() => setMenuOpen(false)}
              aria-label="Sign-in and devices"
              className="rounded-md px-3 py-1.5 text-sm whitespace-nowrap text-ink-soft hover:bg-paper-deep xl:hidden"
            >
              Account
            </NavLink>
            {devMail && (
              <NavLink
                to="/dev/mail"
                onClick={() => setMenuOpen(false)}
                className="rounded-md px-3 py-1.5 text-sm whitespace-nowrap text-ink-soft hover:bg-paper-deep"
              >
                Outbox (dev)
              </NavLink>
            )}
          </nav>
          <div className="flex items-center gap-3 text-sm">
            <NavLink
              to="/account/security"
              className="hidden text-ink-soft hover:text-teal hover:underline xl:inline"
              title="Sign-in and devices"
            >
              {user.name} · <span className="capitalize">{user.role}</span>
            </NavLink>
            <Form method="post" action="/logout">
              <button type="submit" className="rounded-md border border-line px-3 py-1.5 hover:bg-paper-deep">
                Sign out
              </button>
            </Form>
          </div>
        </div>
      </header>
      <main className={wide ? "px-4 py-4" : "mx-auto max-w-7xl px-4 py-6 sm:py-8"}>{children}</main>
    </div>
  );
}
