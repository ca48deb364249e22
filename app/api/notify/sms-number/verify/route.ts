import { requireApiViewer } from "@/app/(auth)/auth";
import { verifySmsCode } from "@/db/queries/notify";
import { smsVerifySchema } from "@/lib/schemas/notify";
import { requireStaff } from "@/lib/server/guards";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  requireStaff(viewer);
  const { code } = await readJson(request, smsVerifySchema);
  return Response.json({ number: verifySmsCode(getDb(), viewer, code, Date.now()) });
});
