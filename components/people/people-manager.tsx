"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { useForm } from "react-hook-form";
import useSWR from "swr";
import { roles, type Role } from "@/lib/auth/viewer";
import type { OrganizationOptionDto, PersonDto } from "@/lib/dto/people";
import { inviteSchema, type InviteInput } from "@/lib/schemas/people";
import { fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

const column = createColumnHelper<PersonDto>();
const roleLabel: Record<Role, string> = { admin: "Administrator", technician: "Technician", customer: "Customer user" };
const statusStyle: Record<PersonDto["status"], string> = {
  invited: "bg-advisory/10 text-ink",
  active: "bg-surface text-ink",
  disabled: "bg-alarm/10 text-alarm",
};
const select = "min-h-11 rounded border border-line bg-panel px-2 text-base";

type PeopleResponse = { people: PersonDto[]; organizations: OrganizationOptionDto[] };

export function PeopleManager({ selfId }: { selfId: string }) {
  const { data, error, mutate } = useSWR<PeopleResponse>("/api/people", fetchJson);
  const [message, setMessage] = useState<string | null>(null);
  const [actionError, setActionError] = useState<string | null>(null);
  const [editing, setEditing] = useState<string | null>(null);
  const customers = useMemo(() => (data?.organizations ?? []).filter((o) => o.kind === "customer"), [data]);

  async function act(what: () => Promise<unknown>, done: string) {
    setActionError(null);
    setMessage(null);
    try {
      await what();
      setMessage(done);
      await mutate();
    } catch (err) {
      setActionError((err as Error).message);
    }
  }

  const patch = (p: PersonDto, body: object) =>
    fetchJson(`/api/people/${p.id}`, { method: "PATCH", body: JSON.stringify(body) });

  function toggleDisabled(p: PersonDto) {
    if (p.status === "disabled") return act(() => patch(p, { disabled: false }), `${p.name} can sign in again.`);
    const self = p.id === selfId ? " This is your own account: you will be signed out." : "";
    // Destructive: say what happens before it does.
    if (
      !window.confirm(
        `Disable ${p.name}? They are signed out everywhere at once, their API tokens stop working and they cannot sign in until re-enabled.${self}`,
      )
    )
      return;
    return act(() => patch(p, { disabled: true }), `${p.name} is disabled.`);
  }

  const columns = useMemo(
    () => [
      column.accessor("name", {
        header: "Name",
        cell: (c) => (
          <span>
            <span className="font-semibold">{c.getValue()}</span>
            <span className="block text-muted">{c.row.original.email}</span>
          </span>
        ),
      }),
      column.accessor("role", { header: "Role", cell: (c) => roleLabel[c.getValue()] }),
      column.accessor("organizationName", { header: "Organization" }),
      column.accessor("status", {
        header: "Status",
        cell: (c) => (
          <span className={`rounded px-2 py-0.5 text-xs font-semibold ${statusStyle[c.getValue()]}`}>
            {c.getValue()}
          </span>
        ),
      }),
      column.display({
        id: "actions",
        header: "",
        cell: (c) => {
          const p = c.row.original;
          return (
            <div className="flex flex-wrap gap-2 sm:justify-end">
              {p.status === "invited" ? (
                <Button
                  variant="secondary"
                  onClick={() =>
                    act(
                      () => fetchJson(`/api/people/${p.id}/invitation`, { method: "POST" }),
                      `A new invitation went to ${p.email}; earlier links no longer work.`,
                    )
                  }
                >
                  Re-send invitation
                </Button>
              ) : null}
              <Button variant="secondary" onClick={() => setEditing(editing === p.id ? null : p.id)}>
                Change role
              </Button>
              <Button variant={p.status === "disabled" ? "secondary" : "danger"} onClick={() => toggleDisabled(p)}>
                {p.status === "disabled" ? "Re-enable" : "Disable"}
              </Button>
            </div>
          );
        },
      }),
    ],
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [editing, selfId],
  );

  const table = useReactTable({ data: data?.people ?? [], columns, getCoreRowModel: getCoreRowModel() });
  const editingPerson = data?.people.find((p) => p.id === editing);

  return (
    <div className="flex flex-col gap-6">
      <InviteForm
        customers={customers}
        onInvited={async (p) => {
          setMessage(`Invitation sent to ${p.email}. The link works once and expires.`);
          await mutate();
        }}
      />
      {message ? (
        <p role="status" className="rounded border border-line bg-panel px-3 py-2">
          {message}
        </p>
      ) : null}
      {actionError || error ? (
        <p role="alert" className="text-alarm">
          {actionError ?? error?.message}
        </p>
      ) : null}
      {editingPerson ? (
        <AccessEditor
          key={editingPerson.id}
          person={editingPerson}
          self={editingPerson.id === selfId}
          customers={customers}
          onCancel={() => setEditing(null)}
          onSave={(body) =>
            act(async () => {
              await patch(editingPerson, body);
              setEditing(null);
            }, `${editingPerson.name}'s access changed; their open pages reconnect with it.`)
          }
        />
      ) : null}
      {/* Below sm each person is a card (cells stacked), so nothing hides off the right edge of a phone. */}
      <div
        tabIndex={0}
        role="region"
        aria-label="People"
        className="overflow-x-auto rounded-lg border border-line bg-panel"
      >
        <table className="w-full text-sm" data-testid="people-table">
          <thead className="text-left text-muted max-sm:sr-only">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <th key={h.id} className={`px-3 py-2 font-semibold ${h.column.columnDef.meta?.className ?? ""}`}>
                    {flexRender(h.column.columnDef.header, h.getContext())}
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-t border-line align-top max-sm:block max-sm:py-2">
                {row.getVisibleCells().map((cell) => (
                  <td
                    key={cell.id}
                    className={`px-3 py-2 max-sm:block max-sm:py-0.5 ${cell.column.columnDef.meta?.className ?? ""}`}
                  >
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

function InviteForm({
  customers,
  onInvited,
}: {
  customers: OrganizationOptionDto[];
  onInvited: (p: PersonDto) => Promise<void>;
}) {
  const [serverError, setServerError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    watch,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<InviteInput>({ resolver: zodResolver(inviteSchema), defaultValues: { role: "technician" } });
  const role = watch("role");

  async function onSubmit(values: InviteInput) {
    setServerError(null);
    try {
      const body = { ...values, organizationId: values.role === "customer" ? values.organizationId : undefined };
      const { person } = await fetchJson<{ person: PersonDto }>("/api/people", {
        method: "POST",
        body: JSON.stringify(body),
      });
      reset({ role: values.role, email: "", name: "", organizationId: values.organizationId });
      await onInvited(person);
    } catch (err) {
      setServerError((err as Error).message);
    }
  }

  return (
    <form
      onSubmit={handleSubmit(onSubmit)}
      noValidate
      aria-label="Invite a person"
      className="grid gap-3 rounded-lg border border-line bg-panel p-4 sm:grid-cols-2"
    >
      <h2 className="text-lg font-semibold sm:col-span-2">Invite a person</h2>
      <Field id="invite-name" label="Name" autoComplete="off" error={errors.name?.message} {...register("name")} />
      <Field
        id="invite-email"
        label="E-mail"
        type="email"
        autoComplete="off"
        error={errors.email?.message}
        {...register("email")}
      />
      <div className="flex flex-col gap-1">
        <label htmlFor="invite-role" className="text-sm font-semibold">
          Role
        </label>
        <select id="invite-role" className={select} {...register("role")}>
          {roles.map((r) => (
            <option key={r} value={r}>
              {roleLabel[r]}
            </option>
          ))}
        </select>
      </div>
      {role === "customer" ? (
        <div className="flex flex-col gap-1">
          <label htmlFor="invite-org" className="text-sm font-semibold">
            Customer organization
          </label>
          <select id="invite-org" className={select} {...register("organizationId")}>
            <option value="">Choose…</option>
            {customers.map((o) => (
              <option key={o.id} value={o.id}>
                {o.name}
              </option>
            ))}
          </select>
          {errors.organizationId ? <p className="text-sm text-alarm">{errors.organizationId.message}</p> : null}
        </div>
      ) : (
        <p className="self-end text-sm text-muted">Staff belong to the service organization.</p>
      )}
      {serverError ? <p className="text-alarm sm:col-span-2">{serverError}</p> : null}
      <Button type="submit" disabled={isSubmitting} className="sm:col-span-2 sm:justify-self-start">
        Send invitation
      </Button>
    </form>
  );
}

function AccessEditor({
  person,
  self,
  customers,
  onCancel,
  onSave,
}: {
  person: PersonDto;
  self: boolean;
  customers: OrganizationOptionDto[];
  onCancel: () => void;
  onSave: (body: { role: Role; organizationId?: string }) => void;
}) {
  const [role, setRole] = useState<Role>(person.role);
  const [organizationId, setOrganizationId] = useState(person.role === "customer" ? person.organizationId : "");

  function save() {
    const demoting = person.role === "admin" && role !== "admin";
    const warning = demoting
      ? `${person.name} will no longer be an administrator${self ? " — this is you: you lose access to the admin pages at once" : ""}.`
      : `${person.name} becomes ${roleLabel[role].toLowerCase()}.`;
    // Destructive when it takes rights away: say so first.
    if (!window.confirm(`${warning} Their open pages reconnect with the new access. Go ahead?`)) return;
    onSave({ role, organizationId: role === "customer" ? organizationId : undefined });
  }

  return (
    <section
      aria-label={`Change ${person.name}'s role`}
      className="flex flex-wrap items-end gap-3 rounded-lg border border-line bg-panel p-4"
    >
      <p className="w-full font-semibold">Change {person.name}&apos;s access</p>
      <div className="flex flex-col gap-1">
        <label htmlFor="access-role" className="text-sm font-semibold">
          Role
        </label>
        <select id="access-role" className={select} value={role} onChange={(e) => setRole(e.target.value as Role)}>
          {roles.map((r) => (
            <option key={r} value={r}>
              {roleLabel[r]}
            </option>
          ))}
        </select>
      </div>
      {role === "customer" ? (
        <div className="flex flex-col gap-1">
          <label htmlFor="access-org" className="text-sm font-semibold">
            Customer organization
          </label>
          <select
            id="access-org"
            className={select}
            value={organizationId}
            onChange={(e) => setOrganizationId(e.target.value)}
          >
            <option value="">Choose…</option>
            {customers.map((o) => (
              <option key={o.id} value={o.id}>
                {o.name}
              </option>
            ))}
          </select>
        </div>
      ) : null}
      <Button onClick={save} disabled={role === "customer" && !organizationId}>
        Save
      </Button>
      <Button variant="secondary" onClick={onCancel}>
        Cancel
      </Button>
    </section>
  );
}
