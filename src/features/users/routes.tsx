import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery } from "@tanstack/react-query";
import { createColumnHelper, getCoreRowModel, useReactTable } from "@tanstack/react-table";
import { useMemo, type ReactNode } from "react";
import { useForm } from "react-hook-form";
import { toast } from "sonner";
import { RoleSchema } from "#shared/schemas/common.ts";
import { OrganisationInputSchema } from "#shared/schemas/documents.ts";
import { InviteInputSchema, type InvitationRow, type InviteInput, type UserRow } from "#shared/schemas/users.ts";
import { Button } from "../../components/ui/button.tsx";
import { actionsColumn, DataTable, useSortedTable } from "../../components/ui/data-table.tsx";
import { SelectField, SelectOptions, TextField } from "../../components/ui/field.tsx";
import { PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { formatInstant, ROLE_LABEL } from "../../lib/format.ts";
import { primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { invitationsQueryOptions, organisationsQueryOptions, useCreateOrganisation, useInvite, useSetOrganisation, useUpdateUser, usersQueryOptions, type Organisation } from "./api.ts";
import { submitting } from "../../lib/forms.ts";

/** The users page is for administrators (the route says so); only theirs is primed. */
export const usersLoader: RouteLoader = (qc) => () =>
  primeWhenAllowed(qc, ["admin"], () => Promise.all([qc.ensureQueryData(usersQueryOptions()), qc.ensureQueryData(invitationsQueryOptions()), qc.ensureQueryData(organisationsQueryOptions())]));

const roleOptions = RoleSchema.options.map((r) => ({ value: r, label: ROLE_LABEL[r] }));

function InviteForm() {
  const invite = useInvite();
  const form = useForm<InviteInput>({ resolver: zodResolver(InviteInputSchema), defaultValues: { email: "", role: "marketing" } });
  const onSubmit = submitting(form, async (v) => {
    await invite.mutateAsync(v);
    toast.success(`Invitation sent to ${v.email}`);
    form.reset({ email: "", role: v.role });
  });
  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-3 sm:grid-cols-[1fr_12rem_auto] sm:items-end">
      <TextField label="E-mail address to invite" type="email" error={form.formState.errors.email?.message} {...form.register("email")} />
      <SelectField label="Role" options={roleOptions} error={form.formState.errors.role?.message} {...form.register("role")} />
      <Button type="submit" variant="primary" busy={invite.isPending}>
        Send invitation
      </Button>
    </form>
  );
}

const col = createColumnHelper<UserRow>();

function UsersTable({ users, organisations }: { users: UserRow[]; organisations: Organisation[] }) {
  const update = useUpdateUser();
  const setOrganisation = useSetOrganisation();
  const columns = useMemo(
    () => [
      col.accessor("name", { header: "Name", meta: { key: true }, cell: (c) => <span className="font-medium">{c.getValue()}</span> }),
      col.accessor("email", { header: "E-mail", meta: { key: true }, cell: (c) => <span className="break-all">{c.getValue()}</span> }),
      col.accessor("role", {
        header: "Role",
        cell: (c) => (
          <label className="block">
            <span className="sr-only">Role of {c.row.original.email}</span>
            <select
              className="rounded-sm border border-rule-strong bg-sheet px-2 py-1"
              value={c.getValue()}
              onChange={(e) => update.mutate({ id: c.row.original.id, role: e.target.value as UserRow["role"] }, { onSuccess: () => toast.success("Role changed") })}
            >
              <SelectOptions options={roleOptions} />
            </select>
          </label>
        ),
      }),
      col.accessor((u) => u.organisation?.name ?? "", {
        id: "organisation",
        header: "Organisation",
        cell: (c) => {
          const u = c.row.original;
          if (u.role !== "investor") return <span className="text-ink-faint">—</span>;
          return (
            <label className="block">
              <span className="sr-only">Organisation of {u.email}</span>
              <select
                className="rounded-sm border border-rule-strong bg-sheet px-2 py-1"
                value={u.organisation ? String(u.organisation.id) : ""}
                onChange={(e) => setOrganisation.mutate({ id: u.id, organisationId: e.target.value === "" ? null : Number(e.target.value) }, { onSuccess: () => toast.success("Organisation set") })}
              >
                <SelectOptions options={[{ value: "", label: "None" }, ...organisations.map((o) => ({ value: String(o.id), label: o.name }))]} />
              </select>
            </label>
          );
        },
      }),
      col.accessor("disabled", {
        header: "Status",
        cell: (c) =>
          c.getValue() ? (
            <span className="inline-flex items-center gap-1 text-bad">
              <span aria-hidden>■</span> Disabled
            </span>
          ) : (
            <span className="inline-flex items-center gap-1 text-good">
              <span aria-hidden>●</span> Active
            </span>
          ),
      }),
      col.accessor("lastSignInAt", { header: "Last sign-in", cell: (c) => <span className="whitespace-nowrap">{formatInstant(c.getValue())}</span> }),
      actionsColumn(col, (u) => (
        <Button
          size="sm"
          variant={u.disabled ? "secondary" : "danger"}
          onClick={() => {
            if (!u.disabled && !window.confirm(`Disable ${u.email}? They are signed out at once.`)) return;
            update.mutate({ id: u.id, disabled: !u.disabled }, { onSuccess: () => toast.success(u.disabled ? "Account enabled" : "Account disabled and signed out") });
          }}
        >
          {u.disabled ? "Enable" : "Disable"}
        </Button>
      )),
    ],
    [update, setOrganisation, organisations],
  );
  const table = useSortedTable({ data: users, columns });
  return <DataTable table={table} caption="Users of the site office and investor room" />;
}

const icol = createColumnHelper<InvitationRow>();
const invitationColumns = [
  icol.accessor("email", { header: "Invited address" }),
  icol.accessor("role", { header: "Role", cell: (c) => ROLE_LABEL[c.getValue()] }),
  icol.accessor("status", { header: "State", cell: (c) => ({ pending: "◌ Waiting", accepted: "● Accepted", expired: "✕ Expired", revoked: "— Replaced" })[c.getValue()] }),
  icol.accessor("invitedBy", { header: "By" }),
  icol.accessor("expiresAt", { header: "Link expires", cell: (c) => formatInstant(c.getValue()) }),
];

function InvitationsTable({ rows }: { rows: InvitationRow[] }) {
  const table = useReactTable({ data: rows, columns: invitationColumns, getCoreRowModel: getCoreRowModel() });
  return <DataTable table={table} caption="Invitations" empty="No invitations sent yet." />;
}

/** Investor organisations: an administrator adds them, then gives each investor theirs in the table above. */
function OrganisationsSection({ organisations }: { organisations: Organisation[] }) {
  const create = useCreateOrganisation();
  const form = useForm<{ name: string }>({ resolver: zodResolver(OrganisationInputSchema), defaultValues: { name: "" } });
  const onSubmit = submitting(form, async (v) => {
    await create.mutateAsync(v);
    toast.success(`${v.name} added`);
    form.reset({ name: "" });
  }, "name");
  return (
    <div className="flex flex-col gap-3">
      {organisations.length === 0 ? (
        <p className="text-sm text-ink-soft">No organisation yet.</p>
      ) : (
        <ul className="flex flex-col divide-y divide-rule border border-rule bg-sheet text-sm" aria-label="Investor organisations">
          {organisations.map((o) => (
            <li key={o.id} className="flex justify-between gap-3 px-3 py-2">
              <span className="font-medium">{o.name}</span>
              <span className="tabular text-ink-soft">
                {o.investors} investor{o.investors === 1 ? "" : "s"}
              </span>
            </li>
          ))}
        </ul>
      )}
      <form onSubmit={onSubmit} noValidate className="grid gap-3 sm:grid-cols-[1fr_auto] sm:items-end" aria-label="Add an organisation">
        <TextField label="New organisation" error={form.formState.errors.name?.message} {...form.register("name")} />
        <Button type="submit" busy={create.isPending}>
          Add organisation
        </Button>
      </form>
    </div>
  );
}

/** A headed section of the page around one table. */
function TableSection({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id}>
      <h2 id={id} className="mb-2 text-lg font-semibold">
        {title}
      </h2>
      {children}
    </section>
  );
}

export function UsersPage() {
  const users = useSuspenseQuery(usersQueryOptions()).data;
  const invitations = useSuspenseQuery(invitationsQueryOptions()).data;
  const organisations = useSuspenseQuery(organisationsQueryOptions()).data;
  return (
    <>
      <PageHeader sheet="Site office · Users" title="Users" description="Accounts exist by invitation only. Changing a role or disabling an account takes effect at once." />
      <div className="flex flex-col gap-6">
        <Sheet label="Invite" title="Invite someone">
          <InviteForm />
        </Sheet>
        <TableSection id="users-h" title="Accounts">
          <UsersTable users={users} organisations={organisations} />
        </TableSection>
        <TableSection id="inv-h" title="Invitations">
          <InvitationsTable rows={invitations} />
        </TableSection>
        <TableSection id="org-h" title="Investor organisations">
          <OrganisationsSection organisations={organisations} />
        </TableSection>
      </div>
    </>
  );
}
