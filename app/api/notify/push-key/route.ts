import { requireApiViewer } from "@/app/(auth)/auth";
import { route } from "@/lib/server/http";
import { requireNotifyPaths } from "@/lib/server/runtime";

// The VAPID public key a browser subscribes with (PushManager.subscribe's applicationServerKey).
export const GET = route(async (request) => {
  await requireApiViewer(request);
  return Response.json({ publicKey: requireNotifyPaths().vapidPublicKey });
});
