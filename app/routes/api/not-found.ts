// Unknown /api/ paths: 404 JSON for every method (scripts read it), not the HTML 404 page.
const notFound = (request: Request) =>
  Response.json({ error: `There is no API path ${new URL(request.url).pathname}; the paths are listed in /api/openapi.json.` }, { status: 404 });

export function loader({ request }: { request: Request }) {
  return notFound(request);
}

export function action({ request }: { request: Request }) {
  return notFound(request);
}
