// What each person sees in the header navigation. Pure, so both the layout and tests use it.
// The account role decides the admin items and "New course"; the data-set check follows the
// course role (an instructor or demonstrator in some course), whatever the account role.
export type Role = "admin" | "course-creator" | "member";

export interface NavItem {
  to: string;
  label: string;
}

export function navFor(role: Role, courseStaff: boolean): NavItem[] {
  const items: NavItem[] = [{ to: "/dashboard", label: "Dashboard" }];
  if (role === "admin" || role === "course-creator") items.push({ to: "/courses/new", label: "New course" });
  if (courseStaff || role !== "member") items.push({ to: "/fit-check", label: "Check a data set" });
  if (role === "admin") {
    items.push(
      { to: "/admin/people", label: "People" },
      { to: "/admin/mail", label: "Sent mail" },
      { to: "/admin/audit", label: "Audit log" },
      { to: "/admin/jobs", label: "Job queue" },
      { to: "/admin/lti", label: "Learning platforms" },
    );
  }
  return items;
}
