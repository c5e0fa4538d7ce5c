import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery } from "@tanstack/react-query";
import { useState } from "react";
import { useForm, type FieldErrors, type UseFormRegisterReturn } from "react-hook-form";
import { Link, useNavigate, useParams, useRouteError, useSearchParams } from "react-router-dom";
import { z } from "zod";
import { AcceptInvitationInputSchema, LoginInputSchema, ResetPasswordInputSchema, ResetRequestInputSchema, type LoginInput } from "#shared/schemas/auth.ts";
import { Button } from "../../components/ui/button.tsx";
import { TextField } from "../../components/ui/field.tsx";
import { Notice } from "../../components/ui/sheet.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { ROLE_LABEL } from "../../lib/format.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { useTitle } from "../../lib/use-title.ts";
import { homeFor, invitationQueryOptions, resetLinkQueryOptions, useAcceptInvitation, useLogin, useRequestReset, useResetPassword } from "./api.ts";
import { safeReturnAddress } from "./return-address.ts";
import { submitting } from "../../lib/forms.ts";

function AuthCard({ title, lead, children }: { title: string; lead?: string; children: React.ReactNode }) {
  useTitle(title, "Plumbline");
  return (
    <div className="mx-auto w-full max-w-md px-4 py-10 sm:py-16">
      <div className="border border-rule bg-sheet">
        <div className="border-b-2 border-ink px-5 py-4">
          <p className="label-caps">Plumbline</p>
          <h1 className="text-xl font-semibold">{title}</h1>
          {lead ? <p className="mt-1 text-sm text-ink-soft">{lead}</p> : null}
        </div>
        <div className="px-5 py-5">{children}</div>
      </div>
    </div>
  );
}

export function SignInPage() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const login = useLogin();
  const form = useForm<LoginInput>({ resolver: zodResolver(LoginInputSchema), defaultValues: { email: "", password: "" } });
  const onSubmit = submitting(form, async (values) => {
    const { user } = await login.mutateAsync(values);
    navigate(safeReturnAddress(params.get("next")) ?? homeFor(user), { replace: true });
  });
  const err = login.error instanceof ApiError && !Object.keys(login.error.fields).length ? login.error : null;
  return (
    <AuthCard title="Sign in" lead="For the operator's staff and invited investors. Accounts are by invitation only.">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        {err ? (
          <Notice tone="error" title={err.code === "rate_limited" ? "Too many attempts" : "Not signed in"}>
            {err.message}
          </Notice>
        ) : null}
        <TextField label="E-mail address" type="email" autoComplete="username" error={form.formState.errors.email?.message} {...form.register("email")} />
        <TextField label="Password" type="password" autoComplete="current-password" error={form.formState.errors.password?.message} {...form.register("password")} />
        <Button type="submit" variant="primary" busy={login.isPending}>
          Sign in
        </Button>
        <p className="text-sm">
          <Link to="/forgot-password" className="text-ink underline underline-offset-4">
            Forgotten your password?
          </Link>
        </p>
      </form>
    </AuthCard>
  );
}

/** A new password typed twice: the second must match the first. */
type PasswordTwice = { password: string; confirm: string };
const passwordsMatch = (v: PasswordTwice) => v.password === v.confirm;
const PASSWORDS_DIFFER = { path: ["confirm"], message: "does not match the password" };

/** The server's own schema, with the password typed twice. */
const AcceptFormSchema = AcceptInvitationInputSchema.extend({ confirm: z.string() }).refine(passwordsMatch, PASSWORDS_DIFFER);

/** The new password and the same again, on the pages that set one. */
function NewPasswordFields({ label, hint, errors, password, confirm }: { label: string; hint: string; errors: FieldErrors<PasswordTwice>; password: UseFormRegisterReturn; confirm: UseFormRegisterReturn }) {
  return (
    <>
      <TextField label={label} type="password" autoComplete="new-password" hint={hint} error={errors.password?.message} {...password} />
      <TextField label="The same password again" type="password" autoComplete="new-password" error={errors.confirm?.message} {...confirm} />
    </>
  );
}

/** Primes the invitation the link names: its address and role. */
export const invitationLoader: RouteLoader = (qc) => async ({ params }) => {
  await qc.ensureQueryData(invitationQueryOptions(params.token ?? ""));
  return null;
};

/** A link from an e-mail that cannot be used (the route's error): the server's reason, and the way on. */
function DeadLink({ title, what, to, label }: { title: string; what: string; to: string; label: string }) {
  const error = useRouteError();
  return (
    <AuthCard title={title}>
      <Notice tone="error">{error instanceof Error ? error.message : `This ${what} cannot be opened.`}</Notice>
      <p className="mt-4 text-sm">
        <Link to={to} className="text-ink underline underline-offset-4">
          {label}
        </Link>
      </p>
    </AuthCard>
  );
}

/** The invitation route's error element: an unknown, used or expired invitation, in the page's own words. */
export function InvitationError() {
  return <DeadLink title="This invitation cannot be used" what="invitation" to="/sign-in" label="Go to sign-in" />;
}

export function AcceptInvitationPage() {
  const { token = "" } = useParams();
  const navigate = useNavigate();
  const invitation = useSuspenseQuery(invitationQueryOptions(token));
  const accept = useAcceptInvitation(token);
  const form = useForm<z.infer<typeof AcceptFormSchema>>({ resolver: zodResolver(AcceptFormSchema), defaultValues: { name: "", password: "", confirm: "" } });
  const onSubmit = submitting(form, async ({ name, password }) => {
    const { user } = await accept.mutateAsync({ name, password });
    navigate(homeFor(user), { replace: true });
  }, "password");
  return (
    <AuthCard title="Accept your invitation" lead={`${invitation.data.email} · ${ROLE_LABEL[invitation.data.role]}`}>
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        <TextField label="Your name" autoComplete="name" error={form.formState.errors.name?.message} {...form.register("name")} />
        <NewPasswordFields
          label="Choose a password"
          hint="At least 12 characters; common passwords are refused. A short sentence works well."
          errors={form.formState.errors}
          password={form.register("password")}
          confirm={form.register("confirm")}
        />
        <Button type="submit" variant="primary" busy={accept.isPending}>
          Create my account
        </Button>
      </form>
    </AuthCard>
  );
}

export function ForgotPasswordPage() {
  const request = useRequestReset();
  const [sent, setSent] = useState<string | null>(null);
  const form = useForm<{ email: string }>({ resolver: zodResolver(ResetRequestInputSchema), defaultValues: { email: "" } });
  const onSubmit = submitting(form, async (v) => {
    const r = await request.mutateAsync(v);
    setSent(r.message);
  }, "email");
  return (
    <AuthCard title="Reset your password" lead="We will e-mail a link that works once, for one hour.">
      {sent ? (
        <Notice title="Check your e-mail">{sent}</Notice>
      ) : (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          <TextField label="E-mail address" type="email" autoComplete="username" error={form.formState.errors.email?.message} {...form.register("email")} />
          <Button type="submit" variant="primary" busy={request.isPending}>
            Send the link
          </Button>
        </form>
      )}
    </AuthCard>
  );
}

const ResetFormSchema = ResetPasswordInputSchema.extend({ confirm: z.string() }).refine(passwordsMatch, PASSWORDS_DIFFER);

export const resetPasswordLoader: RouteLoader = (qc) => async ({ params }) => {
  await qc.fetchQuery(resetLinkQueryOptions(params.token ?? ""));
  return null;
};

/** The reset route's error element: a used, expired or unknown link says so instead of showing a form that cannot work. */
export function ResetLinkError() {
  return <DeadLink title="This reset link cannot be used" what="reset link" to="/forgot-password" label="Ask for a new link" />;
}

export function ResetPasswordPage() {
  const { token = "" } = useParams();
  const navigate = useNavigate();
  const reset = useResetPassword(token);
  const form = useForm<z.infer<typeof ResetFormSchema>>({ resolver: zodResolver(ResetFormSchema), defaultValues: { password: "", confirm: "" } });
  const onSubmit = submitting(form, async ({ password }) => {
    const { user } = await reset.mutateAsync({ password });
    navigate(homeFor(user), { replace: true });
  }, "password");
  return (
    <AuthCard title="Choose a new password" lead="Setting it signs you out on every other device.">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        <NewPasswordFields label="New password" hint="At least 12 characters; common passwords are refused." errors={form.formState.errors} password={form.register("password")} confirm={form.register("confirm")} />
        <Button type="submit" variant="primary" busy={reset.isPending}>
          Set the password
        </Button>
      </form>
    </AuthCard>
  );
}
