import path from "node:path";
import type { Db } from "@/db/client";
import type { Config } from "../config";
import { startFakePushService, type FakePushService } from "./fake-push";
import { startFakeSmsApi, type FakeSmsApi } from "./fake-sms";
import { createPushSender, type PushSender } from "./push";
import { createSmsSender, type SmsSender } from "./sms";
import { resolveVapidKeys } from "./vapid";

// The paths besides e-mail: Web Push with the server's VAPID keys, and texts through the SMS
// provider's SDK. The local fakes of a push service and of the SMS API run on loopback (as the
// SMTP sink does for mail), so development and tests exercise the same requests as production.

export interface NotifyPaths {
  push: PushSender;
  sms: SmsSender;
  vapidPublicKey: string;
  /** The local fake push service (always on loopback: a phone's real subscription never points at it). */
  pushSink: FakePushService;
  /** The local fake SMS API, when no provider is configured. */
  smsSink: FakeSmsApi | null;
  close(): Promise<void>;
}

export async function startNotifyPaths(deps: {
  db: Db;
  config: Config;
  publicUrl: string;
  log: (line: string) => void;
}): Promise<NotifyPaths> {
  const { config } = deps;
  const dataDir = path.dirname(path.resolve(config.DATABASE_PATH));
  const vapid = resolveVapidKeys({ publicKey: config.VAPID_PUBLIC_KEY, privateKey: config.VAPID_PRIVATE_KEY }, dataDir);
  const pushSink = await startFakePushService({ port: config.PUSH_SINK_PORT, log: deps.log });
  let smsSink: FakeSmsApi | null = null;
  try {
    if (!config.SMS_API_KEY)
      smsSink = await startFakeSmsApi({
        db: deps.db,
        port: config.SMS_SINK_PORT,
        webhookUrl: `${deps.publicUrl}/api/sms/inbound`,
        log: deps.log,
      });
  } catch (err) {
    await pushSink.close();
    throw err;
  }
  const sms = createSmsSender(
    smsSink
      ? {
          apiKey: smsSink.apiKey,
          baseUrl: smsSink.baseUrl,
          from: config.SMS_FROM,
          webhookPublicKey: smsSink.webhookPublicKey,
        }
      : {
          apiKey: config.SMS_API_KEY!,
          baseUrl: config.SMS_API_URL,
          from: config.SMS_FROM,
          webhookPublicKey: config.SMS_WEBHOOK_PUBLIC_KEY,
        },
  );
  deps.log(
    `Push notifications: local fake push service on port ${pushSink.port}; ` +
      (smsSink
        ? `texts go to the local fake SMS API on port ${smsSink.port} (admin Texts page); set SMS_API_KEY to send real texts.`
        : "texts go to the configured SMS provider."),
  );
  return {
    push: createPushSender({ vapid, subject: config.VAPID_SUBJECT }),
    sms,
    vapidPublicKey: vapid.publicKey,
    pushSink,
    smsSink,
    async close() {
      await pushSink.close();
      await smsSink?.close();
    },
  };
}
