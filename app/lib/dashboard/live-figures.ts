// The shape of the dashboard's live figures (GET /dashboard/live), shared by the server that
// reads them and the page that polls them; and how often the page asks.

/** How often the dashboard asks for fresh figures while the tab is visible, in milliseconds. */
export const LIVE_POLL_MS = 5000;

export interface LivePractical {
  id: number;
  title: string;
  date: string;
  status: string;
  courseId: number;
  courseCode: string;
  /** groups at a bench */
  groups: number;
  /** groups with at least one version */
  uploaded: number;
  /** every version received */
  versions: number;
  /** the groups' latest versions, by state */
  beingMarked: number;
  marked: number;
  flagged: number;
  lastUploadAt: string | null;
}

export interface LiveFigures {
  /** when the figures were read (ISO) */
  at: string;
  practicals: LivePractical[];
}
