import { data, Form } from "react-router";
import type { Route } from "./+types/jobs";
import { requireUser } from "~/.server/guards.server";
import { readForm } from "~/.server/body.server";
import { formId } from "~/.server/ids.server";
import { queueJobs, retryFailedJob, type QueueJob } from "~/.server/jobs/admin.server";
import { Button, FormMessage } from "~/components/form";
import { PageTitle, TableBox } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Job queue · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, { roles: ["admin"] });
  return queueJobs();
}

export async function action({ request }: Route.ActionArgs) {
  const admin = await requireUser(request, { roles: ["admin"] });
  const form = await readForm(request);
  const jobId = formId(form, "jobId");
  if (jobId === null) return data({ ok: false, message: "Say which job to retry (jobId)." }, { status: 400 });
  const retried = await retryFailedJob(jobId, admin.id);
  if (!retried) return data({ ok: false, message: `Job ${jobId} is not a failed job (it may have been retried already, or removed).` }, { status: 404 });
  return { ok: true, message: `Job ${jobId} will run again now, with its attempts renewed.` };
}

const when = (iso: string) => iso.replace("T", " ").slice(0, 19);

function JobTable({ label, jobs, retry }: { label: string; jobs: QueueJob[]; retry: boolean }) {
  return (
    <TableBox label={label}>
      <table className="w-full border-collapse text-left text-sm">
        <thead>
          <tr className="border-b-2 border-ink">
            <th className="px-2 py-2">Job</th><th className="px-2 py-2">Task</th><th className="px-2 py-2">State</th>
            <th className="px-2 py-2">Attempts</th><th className="px-2 py-2">Due (UTC)</th><th className="px-2 py-2">Last error</th>
            {retry ? <th className="px-2 py-2"><span className="sr-only">Retry</span></th> : null}
          </tr>
        </thead>
        <tbody>
          {jobs.map((j) => (
            <tr key={j.id} className="border-b border-rule align-top">
              <td className="px-2 py-2 tabular-nums">{j.id}</td>
              <td className="px-2 py-2">{j.task}</td>
              <td className="px-2 py-2">{j.state === "running" ? `running since ${when(j.lockedAt!)}` : j.state}</td>
              <td className="px-2 py-2 tabular-nums">{j.attempts} of {j.maxAttempts}</td>
              <td className="px-2 py-2 tabular-nums">{when(j.runAt)}</td>
              <td className="px-2 py-2 break-words">{j.lastError ?? ""}</td>
              {retry ? (
                <td className="px-2 py-2">
                  <Form method="post">
                    <input type="hidden" name="jobId" value={j.id} />
                    <Button type="submit" aria-label={`Retry job ${j.id}`}>Retry</Button>
                  </Form>
                </td>
              ) : null}
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}

export default function AdminJobs({ loaderData, actionData }: Route.ComponentProps) {
  const { waiting, failed } = loaderData;
  return (
    <>
      <PageTitle trail={trailFor("Job queue")} sub="Background work (e-mail, marking) that the workers have not finished. Jobs wait here while no worker runs; a failed job has used all its attempts.">Job queue</PageTitle>
      {actionData ? <FormMessage tone={actionData.ok ? "info" : "error"}>{actionData.message}</FormMessage> : null}
      <h2 className="mt-6 text-xl font-bold">Failed ({failed.length})</h2>
      {failed.length ? <JobTable label="Failed jobs" jobs={failed} retry /> : <p className="text-ink-soft">No failed jobs.</p>}
      <h2 className="mt-6 text-xl font-bold">Waiting ({waiting.length})</h2>
      {waiting.length ? <JobTable label="Waiting jobs" jobs={waiting} retry={false} /> : <p className="text-ink-soft">Nothing waiting: the workers are up to date.</p>}
    </>
  );
}
