"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { customerSchema, type CustomerInput } from "@/lib/schemas/customers";
import type { CustomerDto } from "@/lib/dto/sites";
import { ApiError, fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { ConfirmAction } from "@/components/ui/confirm-action";
import { Field } from "@/components/ui/field";

/** Renames a customer. */
export function CustomerNameForm({ customer }: { customer: CustomerDto }) {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<CustomerInput>({ resolver: zodResolver(customerSchema), defaultValues: { name: customer.name } });
  return (
    <form
      noValidate
      aria-label="Customer name"
      onSubmit={handleSubmit(async (values) => {
        setMessage(null);
        try {
          await fetchJson(`/api/customers/${encodeURIComponent(customer.id)}`, {
            method: "PATCH",
            body: JSON.stringify(values),
          });
          setMessage("Saved.");
          router.refresh();
        } catch (err) {
          if (err instanceof ApiError) for (const f of err.fieldErrors) setError("name", { message: f.message });
          setMessage((err as Error).message);
        }
      })}
      className="flex flex-col gap-3 sm:flex-row sm:items-end"
    >
      <div className="grow">
        <Field id="customer-rename" label="Name" error={errors.name?.message} {...register("name")} />
      </div>
      <Button type="submit" variant="secondary" disabled={isSubmitting}>
        Save name
      </Button>
      {message ? (
        <p role="status" className="text-sm">
          {message}
        </p>
      ) : null}
    </form>
  );
}

/** Retires or restores a customer, after saying what that does to its sites. */
export function CustomerRetirement({ customer }: { customer: CustomerDto }) {
  const router = useRouter();
  const base = `/api/customers/${encodeURIComponent(customer.id)}`;
  if (customer.retiredAtMs)
    return (
      <ConfirmAction
        label="Restore customer…"
        confirmLabel="Restore customer"
        onConfirm={async () => {
          await fetchJson(`${base}/restore`, { method: "POST" });
          router.refresh();
        }}
      >
        <p>
          {customer.name} and the sites retired with it come back: on the board, their rules run again and their
          gateways may connect again.
        </p>
      </ConfirmAction>
    );
  return (
    <ConfirmAction
      label="Retire customer…"
      confirmLabel={`Retire ${customer.name}`}
      onConfirm={async () => {
        await fetchJson(base, { method: "DELETE" });
        router.refresh();
      }}
    >
      <p className="font-semibold">Retire {customer.name}?</p>
      <ul className="list-disc pl-5">
        <li>Its {customer.siteCount} site(s) leave the board and the site lists.</li>
        <li>Their rules stop: no new alarms from them.</li>
        <li>Their gateways are disconnected and refused when they try again.</li>
        <li>History is kept: readings, alarms and records stay, and the customer can be restored.</li>
      </ul>
    </ConfirmAction>
  );
}
