// Where a page sits: Dashboard > course > practical > page. Pure, so every page and the tests
// build the trail the same way. The last step is the page itself and carries no link.
export interface Crumb {
  label: string;
  to?: string;
}

export interface CoursePlace {
  id: number;
  code: string;
  /** the course's clock, for the page's dates (not part of the trail) */
  timeZone?: string;
}

export interface PracticalPlace {
  id: number;
  title: string;
}

/** The trail of a page inside a course (and, when given, a practical); `page` names the page itself. */
export function trailFor(page: string | null, course?: CoursePlace | null, practical?: PracticalPlace | null, between: Crumb[] = []): Crumb[] {
  const trail: Crumb[] = [{ label: "Dashboard", to: "/dashboard" }];
  if (course) trail.push({ label: course.code, to: `/courses/${course.id}` });
  if (practical) trail.push({ label: practical.title, to: `/sessions/${practical.id}` });
  trail.push(...between);
  if (page) trail.push({ label: page });
  else {
    // The page is the last place named (a course's or practical's own page): it is not a link.
    const last = trail[trail.length - 1];
    trail[trail.length - 1] = { label: last.label };
  }
  return trail;
}
