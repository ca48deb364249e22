"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { passwordResetRequestSchema, type PasswordResetRequestInput } from "@/lib/schemas/people";
import { fetchJson } from "@/lib/client/fetcher";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

export function ForgotPasswordForm() {
  const [answer, setAnswer] = useState<string | null>(null);
  const [serverError, setServerError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm<PasswordResetRequestInput>({ resolver: zodResolver(passwordResetRequestSchema) });

  async function onSubmit(values: PasswordResetRequestInput) {
    setServerError(null);
    try {
      const res = await fetchJson<{ message: string }>("/api/password-reset", {
        method: "POST",
        body: JSON.stringify(values),
      });
      setAnswer(res.message);
    } catch (err) {
      setServerError((err as Error).message);
    }
  }

  if (answer)
    return (
      <p role="status" className="rounded border border-line bg-panel px-3 py-2">
        {answer}
      </p>
    );
  return (
    <form onSubmit={handleSubmit(onSubmit)} noValidate className="flex flex-col gap-4">
      <Field
        id="email"
        label="E-mail"
        type="email"
        autoComplete="username"
        error={errors.email?.message}
        {...register("email")}
      />
      {serverError ? (
        <p role="alert" className="text-sm text-alarm">
          {serverError}
        </p>
      ) : null}
      <Button type="submit" disabled={isSubmitting}>
        Send me a link
      </Button>
    </form>
  );
}
