"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { PASSWORD_MIN_LENGTH } from "@/lib/auth/password-policy";
import { changePasswordFormSchema, type ChangePasswordFormInput } from "@/lib/schemas/people";
import { fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

export function PasswordForm({ email }: { email: string }) {
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<ChangePasswordFormInput>({ resolver: zodResolver(changePasswordFormSchema) });

  async function onSubmit(values: ChangePasswordFormInput) {
    setStatus(null);
    try {
      await fetchJson("/api/account/password", {
        method: "POST",
        body: JSON.stringify({ currentPassword: values.currentPassword, newPassword: values.newPassword }),
      });
      reset();
      setStatus({ ok: true, text: "Password changed. Your other sessions were signed out." });
    } catch (err) {
      setStatus({ ok: false, text: (err as Error).message });
    }
  }

  return (
    <form
      onSubmit={handleSubmit(onSubmit)}
      noValidate
      aria-label="Password"
      className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4"
    >
      <h2 className="font-semibold">Password</h2>
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <Field
        id="current-password"
        label="Current password"
        type="password"
        autoComplete="current-password"
        error={errors.currentPassword?.message}
        {...register("currentPassword")}
      />
      <Field
        id="new-password"
        label={`New password (at least ${PASSWORD_MIN_LENGTH} characters; common ones refused)`}
        type="password"
        autoComplete="new-password"
        error={errors.newPassword?.message}
        {...register("newPassword")}
      />
      <Field
        id="confirm-password"
        label="New password again"
        type="password"
        autoComplete="new-password"
        error={errors.confirm?.message}
        {...register("confirm")}
      />
      {status ? (
        <p role={status.ok ? "status" : "alert"} className={status.ok ? "text-sm" : "text-sm text-alarm"}>
          {status.text}
        </p>
      ) : null}
      <Button type="submit" className="self-start" disabled={isSubmitting}>
        Change password
      </Button>
    </form>
  );
}
