"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { z } from "zod";
import { personName } from "@/lib/schemas/people";
import { accountSchema } from "@/lib/schemas/people";
import { fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

const profileSchema = accountSchema.pick({ phone: true }).extend({ name: personName });
type ProfileInput = z.infer<typeof profileSchema>;

/** The person's own name and phone number (units have their own form). */
export function ProfileForm({ name, phone }: { name: string; phone: string | null }) {
  const router = useRouter();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm<ProfileInput>({ resolver: zodResolver(profileSchema), defaultValues: { name, phone: phone ?? "" } });

  async function onSubmit(values: ProfileInput) {
    setStatus(null);
    try {
      await fetchJson("/api/account", { method: "PATCH", body: JSON.stringify(values) });
      setStatus({ ok: true, text: "Saved." });
      router.refresh();
    } catch (err) {
      setStatus({ ok: false, text: (err as Error).message });
    }
  }

  return (
    <form
      onSubmit={handleSubmit(onSubmit)}
      noValidate
      aria-label="Profile"
      className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4"
    >
      <h2 className="font-semibold">Profile</h2>
      <Field id="profile-name" label="Name" autoComplete="name" error={errors.name?.message} {...register("name")} />
      <Field
        id="profile-phone"
        label="Phone number"
        type="tel"
        autoComplete="tel"
        placeholder="+1 555 010 0100"
        error={errors.phone?.message}
        {...register("phone")}
      />
      {status ? (
        <p role={status.ok ? "status" : "alert"} className={status.ok ? "text-sm" : "text-sm text-alarm"}>
          {status.text}
        </p>
      ) : null}
      <Button type="submit" className="self-start" disabled={isSubmitting}>
        Save profile
      </Button>
    </form>
  );
}
