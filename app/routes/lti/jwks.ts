// The tool's public key set (JWKS): platforms check Ratebook's signed client assertions with it
// (1EdTech Security Framework 1.0, 6.3). Give this address to the platform when registering.
import { toolKeySet } from "~/.server/lti/grades.server";

export async function loader() {
  return Response.json(await toolKeySet(), { headers: { "cache-control": "public, max-age=300" } });
}
