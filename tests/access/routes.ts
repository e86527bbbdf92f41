// The leaf routes of app/routes.ts (file and full path), read from the real route config.
import routes from "~/routes";

interface Entry { file: string; path?: string; index?: boolean; children?: Entry[] }

export function leafRoutes(): Array<{ file: string; path: string }> {
  const out: Array<{ file: string; path: string }> = [];
  const walk = (entries: Entry[], base: string) => {
    for (const e of entries) {
      const path = e.path ? `${base.replace(/\/$/, "")}/${e.path}` : base;
      if (e.children?.length) walk(e.children, path);
      else out.push({ file: e.file, path: path || "/" });
    }
  };
  walk(routes as unknown as Entry[], "");
  return out;
}
