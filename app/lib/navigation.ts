// What each role sees in the header navigation. Pure, so both the layout and tests use it.
export type Role = "admin" | "instructor" | "demonstrator" | "student";

export interface NavItem {
  to: string;
  label: string;
}

export function navFor(role: Role): NavItem[] {
  const items: NavItem[] = [{ to: "/dashboard", label: "Dashboard" }];
  if (role === "admin" || role === "instructor") items.push({ to: "/courses/new", label: "New course" });
  if (role !== "student") items.push({ to: "/fit-check", label: "Check a data set" });
  if (role === "admin") {
    items.push(
      { to: "/admin/people", label: "People" },
      { to: "/admin/mail", label: "Sent mail" },
      { to: "/admin/audit", label: "Audit log" },
    );
  }
  return items;
}
