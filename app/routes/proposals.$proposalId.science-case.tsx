import { useState } from "react";
import { Form, useNavigation } from "react-router";
import { z } from "zod";
import { ErrorPage } from "~/components/ErrorPage";
import { Field, inputProps } from "~/components/Field";
import { failure, formAction, intent, orNotFound, refusalFailure } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { Refusal, valueText } from "~/lib/forms";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { SelfReferenceWarnings } from "~/components/SelfReferenceWarnings";
import { selfReferenceCheck } from "~/lib/review/self-reference.server";
import { SCIENCE_CASE_MAX_BYTES } from "~/lib/proposals/science-case";
import { readLimitedFormData, scienceCaseHistory, storeScienceCase } from "~/lib/proposals/science-case.server";
import type { Route } from "./+types/proposals.$proposalId.science-case";

const MAX_MB = SCIENCE_CASE_MAX_BYTES / (1024 * 1024);

export function meta() {
  return [{ title: "Science case · Nightshare" }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const access = await orNotFound(getProposalForUser({ proposalId, user }));
  return {
    proposalId,
    pageLimit: access.call.pageLimit,
    editable: access.editable,
    maxBytes: SCIENCE_CASE_MAX_BYTES,
    history: await orNotFound(scienceCaseHistory({ proposalId, user })),
    selfReference: await orNotFound(selfReferenceCheck({ proposalId, call: access.call })),
  };
}

const scienceCaseIntents = z.discriminatedUnion("intent", [intent("upload")]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const access = await orNotFound(getProposalForUser({ proposalId, user }));
  // A little over the file limit for the multipart envelope.
  const form = await readLimitedFormData(request, SCIENCE_CASE_MAX_BYTES + 64 * 1024);
  if (!form) {
    return failure("upload", { file: `The file is larger than ${MAX_MB} MB, the limit for a science case. Reduce the resolution of its figures and upload it again.` }, {});
  }
  return formAction(form, scienceCaseIntents, async (input) => {
    const file = form.get("file");
    if (!(file instanceof File) || file.size === 0) {
      throw new Refusal(file instanceof File && file.name ? "The file is empty. Choose the PDF of the science case." : "Choose the PDF of the science case to upload.", { field: "file" });
    }
    try {
      const stored = await storeScienceCase({
        proposalId,
        user,
        file: { name: file.name, type: file.type, bytes: new Uint8Array(await file.arrayBuffer()) },
        pageLimit: access.call.pageLimit,
      });
      return { ok: true as const, intent: input.intent, stored };
    } catch (error) {
      // the refused file's name comes back with the message
      return refusalFailure(error, input.intent, { filename: file.name });
    }
  });
}

function size(bytes: number) {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1)} MB` : `${Math.max(1, Math.round(bytes / 1024))} kB`;
}

export default function ScienceCase({ loaderData, actionData }: Route.ComponentProps) {
  const { proposalId, pageLimit, editable, history, maxBytes, selfReference } = loaderData;
  const navigation = useNavigation();
  const busy = navigation.state === "submitting";
  const [clientError, setClientError] = useState<string | null>(null);
  const serverError = actionData && !actionData.ok ? actionData.errors.file ?? actionData.errors.form : undefined;
  const refusedName = actionData && !actionData.ok ? (valueText(actionData.values, "filename") ?? null) : null;
  const error = clientError ?? serverError;
  const [current, ...earlier] = history;
  const href = (id: number, inline = false) => `/proposals/${proposalId}/files/${id}${inline ? "?inline=1" : ""}`;
  return (
    <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
      {selfReference ? <div className="lg:col-span-2"><SelfReferenceWarnings check={selfReference} /></div> : null}
      <section className="card space-y-4">
        <h2>Science case</h2>
        <p className="text-sm text-slate-700">
          One PDF of at most <strong>{pageLimit} pages</strong> (the call's limit) and {MAX_MB} MB. It follows the cover and the technical pages in the proposal PDF. Uploading a new file replaces the current one; earlier versions stay in the history.
        </p>
        {actionData?.ok ? (
          <p role="status" className="rounded-md border border-emerald-200 bg-emerald-50 px-4 py-2 text-sm text-emerald-900">
            Uploaded {actionData.stored.filename}: {actionData.stored.pageCount} page{actionData.stored.pageCount === 1 ? "" : "s"}, {size(actionData.stored.sizeBytes)}.
          </p>
        ) : null}
        {editable ? (
          <Form
            method="post"
            encType="multipart/form-data"
            className="space-y-3"
            onSubmit={(event) => {
              const input = event.currentTarget.elements.namedItem("file") as HTMLInputElement;
              const f = input.files?.[0];
              const message = !f ? "Choose the PDF of the science case to upload." : f.size === 0 ? "The file is empty. Choose the PDF of the science case." : f.size > maxBytes ? `The file is ${size(f.size)}; the limit is ${MAX_MB} MB.` : null;
              setClientError(message);
              if (message) event.preventDefault();
            }}
          >
            <Field
              id="file"
              label={current ? "Replace with a new PDF" : "PDF file"}
              error={error ? (refusedName && !clientError ? `${refusedName}: ${error}` : error) : undefined}
              hint={`Checked by its content (it must be a readable, unencrypted PDF), and its pages are counted against the limit of ${pageLimit}.`}
            >
              <input {...inputProps("file", error)} type="file" name="file" accept="application/pdf,.pdf" onChange={() => setClientError(null)} />
            </Field>
            <input type="hidden" name="intent" value="upload" />
            <button type="submit" className="btn" disabled={busy}>
              {busy ? "Uploading…" : current ? "Upload new version" : "Upload"}
            </button>
          </Form>
        ) : (
          <p className="text-sm text-slate-600">The proposal is not a draft, so the science case cannot be replaced.</p>
        )}
      </section>

      <section className="card space-y-3">
        <h2>Current version</h2>
        {current ? (
          <div className="text-sm">
            <p>
              <a href={href(current.id)} className="font-semibold">
                {current.filename}
              </a>{" "}
              · {current.pageCount} page{current.pageCount === 1 ? "" : "s"} · {size(current.sizeBytes)}
            </p>
            <p className="text-slate-600">
              Uploaded {current.createdAt.slice(0, 16).replace("T", " ")} UTC{current.uploadedBy ? ` by ${current.uploadedBy}` : ""} ·{" "}
              <a href={href(current.id, true)} target="_blank" rel="noreferrer">
                open in the browser
              </a>
            </p>
            <p className="mt-1 font-mono text-xs break-all text-slate-500" title="SHA-256 of the file">
              sha256 {current.sha256}
            </p>
          </div>
        ) : (
          <p className="text-sm text-slate-600">No science case uploaded yet.</p>
        )}
        <h3 className="pt-2 font-semibold text-night-900">Earlier versions</h3>
        {earlier.length ? (
          <table className="table-base">
            <thead>
              <tr>
                <th>File</th>
                <th>Pages</th>
                <th>Uploaded (UTC)</th>
              </tr>
            </thead>
            <tbody>
              {earlier.map((f) => (
                <tr key={f.id}>
                  <td>
                    <a href={href(f.id)}>{f.filename}</a> <span className="text-xs text-slate-500">{size(f.sizeBytes)}</span>
                  </td>
                  <td>{f.pageCount}</td>
                  <td>
                    {f.createdAt.slice(0, 16).replace("T", " ")}
                    {f.uploadedBy ? <span className="block text-xs text-slate-500">{f.uploadedBy}</span> : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : (
          <p className="text-sm text-slate-600">None.</p>
        )}
      </section>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorPage error={error} />;
}
