"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState, useSyncExternalStore } from "react";
import { useFieldArray, useForm, type Resolver } from "react-hook-form";
import { siteSchema, type SiteInput } from "@/lib/schemas/sites";
import type { SiteRecordDto } from "@/lib/dto/sites";
import { ApiError, fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

let zoneList: string[] | null = null;
/** Every IANA zone this browser knows, for the time zone list; UTC first. */
function browserTimeZones(): string[] {
  if (!zoneList) {
    const zones = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : [];
    zoneList = ["UTC", ...zones.filter((z) => z !== "UTC")];
  }
  return zoneList;
}
const noZones: string[] = [];
const subscribeNever = () => () => {};

const blankContact = { name: "", role: "", phone: "", email: "" };

/**
 * A site's record: name, kind of building, address, IANA time zone, contacts and after-hours
 * access notes. Adds a site to `customerId`, or edits `existing`.
 */
export function SiteForm({ customerId, existing }: { customerId: string; existing?: SiteRecordDto }) {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  // The browser's own list, after hydration: the server's Node may know another set of zones.
  const zones = useSyncExternalStore(subscribeNever, browserTimeZones, () => noZones);
  const {
    register,
    control,
    handleSubmit,
    setError,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<SiteInput>({
    // The edit sends the whole record too, so one schema checks both.
    resolver: zodResolver(siteSchema) as Resolver<SiteInput>,
    defaultValues: existing
      ? {
          customerId,
          name: existing.name,
          kind: existing.kind,
          address: existing.address,
          timeZone: existing.timeZone,
          contacts: existing.contacts,
          accessNotes: existing.accessNotes,
        }
      : { customerId, name: "", kind: "", address: "", timeZone: "", contacts: [], accessNotes: "" },
  });
  const contacts = useFieldArray({ control, name: "contacts" });

  async function onSubmit(values: SiteInput) {
    setMessage(null);
    try {
      if (existing) {
        const { customerId: _customer, ...patch } = values;
        void _customer;
        await fetchJson(`/api/sites/${encodeURIComponent(existing.id)}`, {
          method: "PATCH",
          body: JSON.stringify(patch),
        });
        setMessage("Saved.");
        router.refresh();
      } else {
        const res = await fetchJson<{ site: SiteRecordDto }>("/api/sites", {
          method: "POST",
          body: JSON.stringify(values),
        });
        reset();
        // Next: its equipment.
        router.push(`/sites/${encodeURIComponent(res.site.id)}/setup`);
      }
    } catch (err) {
      if (err instanceof ApiError)
        for (const f of err.fieldErrors) setError(f.path as keyof SiteInput, { message: f.message });
      setMessage((err as Error).message);
    }
  }

  const id = (name: string) => `site-${existing?.id ?? "new"}-${name}`;
  return (
    <form
      noValidate
      aria-label={existing ? "Site details" : "Add site"}
      onSubmit={handleSubmit(onSubmit)}
      className="grid gap-3 rounded-lg border border-line bg-panel p-4 sm:grid-cols-2"
    >
      <Field id={id("name")} label="Site name" error={errors.name?.message} {...register("name")} />
      <Field
        id={id("kind")}
        label="Kind of building"
        placeholder="e.g. Medical office, Data hall"
        error={errors.kind?.message}
        {...register("kind")}
      />
      <div className="sm:col-span-2">
        <Field id={id("address")} label="Street address" error={errors.address?.message} {...register("address")} />
      </div>
      <div className="sm:col-span-2">
        <Field
          id={id("timeZone")}
          label="Time zone (IANA)"
          placeholder="Type to search, e.g. America/Chicago"
          list={id("zones")}
          autoComplete="off"
          error={errors.timeZone?.message}
          {...register("timeZone")}
        />
        <datalist id={id("zones")}>
          {zones.map((z) => (
            <option key={z} value={z} />
          ))}
        </datalist>
      </div>
      <fieldset className="flex flex-col gap-3 sm:col-span-2">
        <legend className="text-sm font-semibold">Site contacts</legend>
        {contacts.fields.map((c, i) => (
          <div key={c.id} className="grid gap-2 rounded border border-line p-3 sm:grid-cols-2" data-testid="contact">
            <Field
              id={id(`contact-${i}-name`)}
              label="Contact name"
              error={errors.contacts?.[i]?.name?.message}
              {...register(`contacts.${i}.name`)}
            />
            <Field
              id={id(`contact-${i}-role`)}
              label="Role"
              placeholder="e.g. Facilities manager"
              error={errors.contacts?.[i]?.role?.message}
              {...register(`contacts.${i}.role`)}
            />
            <Field
              id={id(`contact-${i}-phone`)}
              label="Phone"
              type="tel"
              error={errors.contacts?.[i]?.phone?.message}
              {...register(`contacts.${i}.phone`)}
            />
            <Field
              id={id(`contact-${i}-email`)}
              label="E-mail"
              type="email"
              error={errors.contacts?.[i]?.email?.message}
              {...register(`contacts.${i}.email`)}
            />
            <div className="sm:col-span-2">
              <Button variant="secondary" type="button" onClick={() => contacts.remove(i)}>
                Remove contact
              </Button>
            </div>
          </div>
        ))}
        <div>
          <Button variant="secondary" type="button" onClick={() => contacts.append(blankContact)}>
            Add contact
          </Button>
        </div>
      </fieldset>
      <div className="flex flex-col gap-1 sm:col-span-2">
        <label htmlFor={id("accessNotes")} className="text-sm font-semibold">
          Access notes for after hours
        </label>
        <textarea
          id={id("accessNotes")}
          rows={4}
          placeholder="Where the gate code is kept, how to reach the plant room, who to call"
          className="rounded border border-line bg-panel p-3 text-base"
          aria-invalid={errors.accessNotes ? true : undefined}
          {...register("accessNotes")}
        />
        {errors.accessNotes ? <p className="text-sm text-alarm">{errors.accessNotes.message}</p> : null}
      </div>
      <input type="hidden" {...register("customerId")} />
      <div className="flex flex-wrap items-center gap-3 sm:col-span-2">
        <Button type="submit" disabled={isSubmitting}>
          {existing ? "Save site" : "Add site"}
        </Button>
        {message ? (
          <p role="status" className="text-sm">
            {message}
          </p>
        ) : null}
      </div>
    </form>
  );
}
