// Learning platforms (LTI 1.3): an admin registers each platform's issuer, client id, addresses
// and deployment ids, and finds here the addresses to give the platform for Ratebook.
import { data, Form, useNavigation } from "react-router";
import type { Route } from "./+types/lti";
import { requireUser } from "~/.server/guards.server";
import { readForm } from "~/.server/body.server";
import { formId } from "~/.server/ids.server";
import { listPlatforms, registerPlatform, removePlatform, type FieldErrors } from "~/.server/lti/platforms.server";
import { toolKeySetUrl, toolLaunchUrl, toolLoginUrl } from "~/.server/lti/launch.server";
import { Button, Field, FormMessage } from "~/components/form";
import { PageTitle, TableBox } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Learning platforms · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, { roles: ["admin"] });
  const platforms = await listPlatforms();
  return {
    tool: { loginUrl: toolLoginUrl(), launchUrl: toolLaunchUrl(), keySetUrl: toolKeySetUrl() },
    platforms: platforms.map((p) => ({ id: p.id, name: p.name, issuer: p.issuer, clientId: p.clientId, loginUrl: p.loginUrl, keySetUrl: p.keySetUrl, tokenUrl: p.tokenUrl, deploymentIds: p.deploymentIds })),
  };
}

type ActionResult = { intent: string; errors: FieldErrors; values: Record<string, string>; notice: string | null };

export async function action({ request }: Route.ActionArgs) {
  const admin = await requireUser(request, { roles: ["admin"] });
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const reply = (r: Omit<ActionResult, "intent">, status = 200) => data<ActionResult>({ intent, ...r }, { status });
  if (intent === "register") {
    const result = await registerPlatform(admin, {
      name: form.get("name"),
      issuer: form.get("issuer"),
      clientId: form.get("clientId"),
      loginUrl: form.get("loginUrl"),
      keySetUrl: form.get("keySetUrl"),
      tokenUrl: form.get("tokenUrl"),
      deploymentIds: form.get("deploymentIds"),
    });
    if (!result.ok) return reply({ errors: result.errors, values: result.values, notice: null }, 400);
    return reply({ errors: {}, values: {}, notice: `${result.platform.name} is registered: its launches are accepted from now on.` });
  }
  if (intent === "remove") {
    const id = formId(form, "platformId");
    if (id === null) return reply({ errors: { form: "Say which platform to remove (platformId)." }, values: {}, notice: null }, 400);
    if (!(await removePlatform(admin, id))) return reply({ errors: { form: `There is no platform ${id}; it may have been removed already.` }, values: {}, notice: null }, 404);
    return reply({ errors: {}, values: {}, notice: "The platform is removed: its launches are refused from now on." });
  }
  return reply({ errors: { form: `Unknown action "${intent}".` }, values: {}, notice: null }, 400);
}

export default function LearningPlatforms({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errors = actionData?.intent === "register" ? actionData.errors : {};
  const values = actionData?.intent === "register" ? actionData.values : {};
  return (
    <>
      <PageTitle trail={trailFor("Learning platforms")} sub="Platforms whose LTI 1.3 launches open Ratebook: a launch maps the platform course to a Ratebook course and its people to accounts.">
        Learning platforms
      </PageTitle>
      {actionData?.notice ? <FormMessage tone="info">{actionData.notice}</FormMessage> : null}
      {actionData?.errors.form ? <FormMessage tone="error">{actionData.errors.form}</FormMessage> : null}
      <section aria-labelledby="tool-h" className="mb-6 rounded border border-rule bg-white p-4">
        <h2 id="tool-h" className="mb-2 text-xl font-bold">Give the platform these addresses</h2>
        <dl className="grid gap-1 text-sm sm:grid-cols-[auto_1fr] sm:gap-x-4">
          <dt className="font-bold">Login initiation</dt><dd className="break-all">{loaderData.tool.loginUrl}</dd>
          <dt className="font-bold">Redirect (launch)</dt><dd className="break-all">{loaderData.tool.launchUrl}</dd>
          <dt className="font-bold">Tool key set (JWKS, for grades)</dt><dd className="break-all">{loaderData.tool.keySetUrl}</dd>
        </dl>
      </section>
      <section aria-labelledby="list-h" className="mb-6">
        <h2 id="list-h" className="mb-3 text-xl font-bold">Registered ({loaderData.platforms.length})</h2>
        {loaderData.platforms.length === 0 ? (
          <p className="text-ink-soft">None yet: launches from any platform are refused.</p>
        ) : (
          <TableBox label="Registered learning platforms">
            <table className="w-full border-collapse text-left text-sm">
              <thead>
                <tr className="border-b-2 border-ink">
                  <th className="px-2 py-2">Name</th><th className="px-2 py-2">Issuer</th><th className="px-2 py-2">Client id</th>
                  <th className="px-2 py-2">Deployments</th><th className="px-2 py-2">Key set</th><th className="px-2 py-2"><span className="sr-only">Remove</span></th>
                </tr>
              </thead>
              <tbody>
                {loaderData.platforms.map((p) => (
                  <tr key={p.id} className="border-b border-rule align-top">
                    <td className="px-2 py-2">{p.name}</td>
                    <td className="px-2 py-2 break-all">{p.issuer}</td>
                    <td className="px-2 py-2 break-all">{p.clientId}</td>
                    <td className="px-2 py-2 break-all">{p.deploymentIds.join(", ")}</td>
                    <td className="px-2 py-2 break-all">{p.keySetUrl}</td>
                    <td className="px-2 py-2">
                      <Form method="post">
                        <input type="hidden" name="intent" value="remove" />
                        <input type="hidden" name="platformId" value={p.id} />
                        <button type="submit" className="rounded border border-ink-soft px-2 py-0.5 hover:bg-accent-soft" aria-label={`Remove ${p.name}`}>Remove</button>
                      </Form>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </TableBox>
        )}
      </section>
      <section aria-labelledby="add-h" className="max-w-xl rounded border border-rule bg-white p-4">
        <h2 id="add-h" className="mb-3 text-xl font-bold">Register a platform</h2>
        <Form method="post" noValidate>
          <input type="hidden" name="intent" value="register" />
          <Field label="Name" name="name" defaultValue={values.name} error={errors.name} required />
          <Field label="Issuer" name="issuer" hint="the iss of the platform's launches" defaultValue={values.issuer} error={errors.issuer} required />
          <Field label="Client id" name="clientId" hint="the id the platform gave Ratebook" defaultValue={values.clientId} error={errors.clientId} required />
          <Field label="Authentication address" name="loginUrl" hint="the platform's OIDC authorisation endpoint" defaultValue={values.loginUrl} error={errors.loginUrl} required />
          <Field label="Key set address" name="keySetUrl" hint="the platform's public keys (JWKS)" defaultValue={values.keySetUrl} error={errors.keySetUrl} required />
          <Field label="Token address" name="tokenUrl" hint="optional: the platform's OAuth 2 token endpoint" defaultValue={values.tokenUrl} error={errors.tokenUrl} />
          <Field label="Deployment ids" name="deploymentIds" hint="separate several with spaces or commas" defaultValue={values.deploymentIds} error={errors.deploymentIds} required />
          <Button busy={busy}>Register</Button>
        </Form>
      </section>
    </>
  );
}
