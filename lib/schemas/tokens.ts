import { z } from "zod";
import { safeText } from "./text";

export const createTokenSchema = z.object({
  name: safeText(z.string().trim().min(1, "Give the token a name").max(80, "At most 80 characters")),
});
export type CreateTokenInput = z.infer<typeof createTokenSchema>;
