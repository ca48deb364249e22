import { z } from "zod";

export const createTokenSchema = z.object({
  name: z.string().trim().min(1, "Give the token a name").max(80, "At most 80 characters"),
});
export type CreateTokenInput = z.infer<typeof createTokenSchema>;
