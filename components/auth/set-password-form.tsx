"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import Link from "next/link";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { PASSWORD_MIN_LENGTH } from "@/lib/auth/password-policy";
import { newPasswordFormSchema, type NewPasswordFormInput } from "@/lib/schemas/people";
import { fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

/** Sets a password through an e-mailed link; on success the person signs in with it. */
export function SetPasswordForm({
  token,
  email,
  purpose,
}: {
  token: string;
  email: string;
  purpose: "invite" | "reset";
}) {
  const [done, setDone] = useState(false);
  const [serverError, setServerError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm<NewPasswordFormInput>({ resolver: zodResolver(newPasswordFormSchema) });

  async function onSubmit(values: NewPasswordFormInput) {
    setServerError(null);
    try {
      await fetchJson(`/api/account-links/${token}`, {
        method: "POST",
        body: JSON.stringify({ password: values.password }),
      });
      setDone(true);
    } catch (err) {
      setServerError((err as Error).message);
    }
  }

  if (done)
    return (
      <div role="status" className="flex flex-col gap-3">
        <p>
          Your password is set.
          {purpose === "reset" ? " Every other session of your account was signed out." : ""}
        </p>
        <Link href="/sign-in" className="underline">
          Sign in
        </Link>
      </div>
    );

  return (
    <form onSubmit={handleSubmit(onSubmit)} noValidate className="flex flex-col gap-4">
      {/* Lets a password manager file the new password under the right account. */}
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <p className="text-sm text-muted">
        At least {PASSWORD_MIN_LENGTH} characters. A few unrelated words make a good one; no special characters are
        required. Common passwords are refused.
      </p>
      <Field
        id="new-password"
        label="New password"
        type="password"
        autoComplete="new-password"
        error={errors.password?.message}
        {...register("password")}
      />
      <Field
        id="confirm-password"
        label="The same again"
        type="password"
        autoComplete="new-password"
        error={errors.confirm?.message}
        {...register("confirm")}
      />
      {serverError ? (
        <p role="alert" className="rounded border border-alarm/40 bg-alarm/5 px-3 py-2 text-sm text-alarm">
          {serverError}
        </p>
      ) : null}
      <Button type="submit" disabled={isSubmitting}>
        Set password
      </Button>
    </form>
  );
}
