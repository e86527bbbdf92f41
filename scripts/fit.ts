// Command: one JSON request on stdin -> one JSON result on stdout. The request is a run's fit
// request, or { "arrhenius": { "benches": [...] } } for the pooled Arrhenius fit.
// Exit 0 with the result; exit 2 with { "errors": [{ path, message }] } for an invalid request.
// A thin wrapper: all checking and fitting is in app/lib/kinetics.

import { runRequest, validateRequest } from "../app/lib/kinetics/index.ts";

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString("utf8");
}

function fail(errors: { path: string; message: string }[]): never {
  process.stdout.write(JSON.stringify({ errors }, null, 2) + "\n");
  process.exit(2);
}

const text = await readStdin();
let json: unknown;
try {
  json = JSON.parse(text);
} catch (e) {
  fail([{ path: "", message: `not valid JSON: ${(e as Error).message}` }]);
}
const checked = validateRequest(json);
if (!checked.ok) fail(checked.errors);
process.stdout.write(JSON.stringify(runRequest(checked.value), null, 2) + "\n");
