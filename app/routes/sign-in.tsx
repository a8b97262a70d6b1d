import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { data, Form, redirect, useActionData, useNavigation, useSubmit } from "react-router";
import { z } from "zod";
import { Field, inputProps } from "~/components/Field";
import { getSessionUser } from "~/lib/auth/auth.server";
import {
  CODE_LIFETIME_SECONDS,
  pendingCodeFor,
  restartSignIn,
  safeRedirectTo,
  sendSignInCode,
  verifySignInCode,
} from "~/lib/auth/sign-in.server";
import { failure, formAction, intent } from "~/lib/actions.server";
import { valueText, type ActionFailure } from "~/lib/forms";
import { codeSchema, emailSchema } from "~/lib/schemas/auth";
import { getSession, sessionStorage } from "~/lib/auth/session.server";
import type { Route } from "./+types/sign-in";

export function meta() {
  return [{ title: "Sign in · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const redirectTo = safeRedirectTo(url.searchParams.get("redirectTo"));
  if (await getSessionUser(request)) throw redirect(redirectTo);
  // The address shown is the one the server mailed the code to, never one the browser sends.
  const pending = await pendingCodeFor(request);
  const session = await getSession(request);
  const flash = session.get("flash");
  return data(
    {
      step: pending?.usable ? ("code" as const) : ("email" as const),
      email: pending?.email ?? "",
      error: flash ?? null,
      redirectTo,
      minutes: CODE_LIFETIME_SECONDS / 60,
    },
    flash ? { headers: { "Set-Cookie": await sessionStorage.commitSession(session) } } : undefined,
  );
}

const signInIntents = z.discriminatedUnion("intent", [intent("send", emailSchema), intent("verify", codeSchema), intent("restart")]);

export async function action({ request }: Route.ActionArgs) {
  return formAction(request, signInIntents, async (input, { values }) => {
    switch (input.intent) {
      case "restart":
        return restartSignIn(request);
      case "verify":
        return verifySignInCode(request, { code: input.code });
      case "send": {
        // a code sent is a redirect; what comes back is the rate limit
        const limited = await sendSignInCode(request, { email: input.email.toLowerCase(), redirectTo: input.redirectTo ?? "/" });
        return failure(input.intent, { email: limited.message }, values, { status: 429, headers: { "Retry-After": String(limited.retryAfterSeconds) } });
      }
    }
  });
}

function EmailStep({ redirectTo, email }: { redirectTo: string; email: string }) {
  const actionData = useActionData<ActionFailure>();
  const navigation = useNavigation();
  const submit = useSubmit();
  const server = actionData && !actionData.ok ? actionData : undefined;
  const { register, handleSubmit, formState } = useForm<z.input<typeof emailSchema>, unknown, z.output<typeof emailSchema>>({
    resolver: zodResolver(emailSchema),
    defaultValues: { email: valueText(server?.values, "email") ?? email, redirectTo },
  });
  const error = formState.errors.email?.message ?? server?.errors.email;
  return (
    <Form
      method="post"
      noValidate
      className="space-y-4"
      onSubmit={handleSubmit((values, event) => submit(event?.target as HTMLFormElement))}
    >
      <input type="hidden" {...register("redirectTo")} />
      <input type="hidden" name="intent" value="send" />
      <Field label="E-mail address" id="email" error={error} hint="We send a one-time code and a sign-in link to this address.">
        <input
            type="email"
            autoComplete="email"
            autoFocus
            defaultValue={valueText(server?.values, "email") ?? email}
            {...inputProps("email", error)}
            {...register("email")}
          />
      </Field>
      <button type="submit" className="btn w-full" disabled={navigation.state === "submitting"}>
        {navigation.state === "submitting" ? "Sending…" : "Send me a code"}
      </button>
    </Form>
  );
}

function CodeStep({ email, minutes }: { email: string; minutes: number }) {
  const actionData = useActionData<ActionFailure>();
  const server = actionData && !actionData.ok ? actionData : undefined;
  const { register, handleSubmit, formState } = useForm<z.input<typeof codeSchema>, unknown, z.output<typeof codeSchema>>({
    resolver: zodResolver(codeSchema),
    defaultValues: { code: valueText(server?.values, "code") ?? "" },
  });
  const submit = useSubmit();
  const error = formState.errors.code?.message ?? server?.errors.code;
  return (
    <div className="space-y-5">
      <p className="text-slate-700">
        We sent a code to <strong>{email}</strong>. It works once and expires {minutes} minutes after it was sent.
        You can also open the link in that e-mail.
      </p>
      <Form method="post" noValidate className="space-y-4" onSubmit={handleSubmit((_, event) => submit(event?.target as HTMLFormElement))}>
        <input type="hidden" name="intent" value="verify" />
        <Field label="Code from the e-mail" id="code" error={error} hint="Six letters and digits; upper or lower case both work.">
          <input
            autoComplete="one-time-code"
            autoCapitalize="characters"
            autoFocus
            spellCheck={false}
            maxLength={8}
            {...inputProps("code", error)}
            className="input font-mono text-lg tracking-[0.3em]"
            {...register("code")}
          />
        </Field>
        <button type="submit" className="btn w-full">Sign in</button>
      </Form>
      <div className="flex flex-wrap gap-2 border-t border-slate-200 pt-4 text-sm">
        <Form method="post">
          <input type="hidden" name="intent" value="send" />
          <input type="hidden" name="email" value={email} />
          <button type="submit" className="btn-quiet">Send a new code</button>
        </Form>
        <Form method="post">
          <input type="hidden" name="intent" value="restart" />
          <button type="submit" className="btn-quiet">Use another address</button>
        </Form>
      </div>
    </div>
  );
}

export default function SignIn({ loaderData }: Route.ComponentProps) {
  const { step, email, error, redirectTo, minutes } = loaderData;
  return (
    <div className="mx-auto max-w-md">
      <div className="card">
        <h1>Sign in</h1>
        <p className="mt-1 mb-5 text-sm text-slate-600">
          No password: Nightshare mails you a code. A new address gets a new account.
        </p>
        {error ? (
          <p role="alert" className="mb-4 rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">
            {error}
          </p>
        ) : null}
        {step === "code" ? <CodeStep email={email} minutes={minutes} /> : <EmailStep redirectTo={redirectTo} email={email} />}
      </div>
    </div>
  );
}
