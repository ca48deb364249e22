import type { Db } from "@/db/client";
import type { CommStatus } from "@/lib/rules";
import type { Config } from "../config";
import { createMailer, type Mailer } from "../mail";
import { customerAlarmMail } from "../notify/customer-mail";
import { startNotifyPaths, type NotifyPaths } from "../notify/start";
import type { StorageHealth } from "../storage-health";
import { createEscalator, type Escalator } from "./escalation";
import { createIncidentFiler } from "../incidents";
import { createAlarmService, type AlarmService, type SiteEvaluationSummary } from "./service";

// Starts the alarm side of the server: mail (real SMTP or the local sink), push and texts (real
// or the local fakes), the rule checks with their alarm state, and the escalation timer.
// server.ts calls this once.

export interface AlarmSystem {
  service: AlarmService;
  escalator: Escalator;
  mailer: Mailer;
  notify: NotifyPaths;
  close(): Promise<void>;
}

const TICK_MS = 15_000;
/** How often escalation looks for a step that fell due (well inside the 5 s it may be late), and rule evaluations settle. */
const ESCALATION_TICK_MS = 1_000;

export async function startAlarmSystem(deps: {
  db: Db;
  config: Config;
  publicUrl: string;
  comms?: (siteId: string) => CommStatus;
  /** Called after each evaluation and alarm change, to push to browsers. */
  onSiteChanged?: (siteId: string, summary: SiteEvaluationSummary | null) => void;
  log: (line: string) => void;
  clock?: () => number;
  /** Hears of failed and successful saves (a full disk). */
  storage?: Pick<StorageHealth, "report" | "ok">;
}): Promise<AlarmSystem> {
  const clock = deps.clock ?? Date.now;
  const mailer = await createMailer({
    db: deps.db,
    smtpUrl: deps.config.SMTP_URL,
    sinkPort: deps.config.SMTP_PORT,
    from: deps.config.MAIL_FROM,
    log: deps.log,
    storage: deps.storage,
  });
  let notify: NotifyPaths;
  try {
    notify = await startNotifyPaths({ db: deps.db, config: deps.config, publicUrl: deps.publicUrl, log: deps.log });
  } catch (err) {
    await mailer.close();
    throw err;
  }
  const escalator = createEscalator({
    db: deps.db,
    mailer,
    clock,
    publicUrl: deps.publicUrl,
    push: notify.push,
    sms: notify.sms,
    log: deps.log,
  });
  const tellCustomers = customerAlarmMail({ db: deps.db, mailer, publicUrl: deps.publicUrl, log: deps.log });
  const service = createAlarmService({
    db: deps.db,
    clock,
    comms: deps.comms,
    onEvaluated: (summary) => deps.onSiteChanged?.(summary.siteId, summary),
    onAlarmsChanged: (siteId, transitions) => {
      deps.onSiteChanged?.(siteId, null);
      if (transitions.some((t) => t.to === "unacknowledged")) escalate();
      tellCustomers(siteId, transitions);
    },
    log: deps.log,
    storage: deps.storage,
    incidents: createIncidentFiler(deps.db, deps.log),
  });
  // Both run off timers and commits: a failure (a full disk) is logged and tried again next tick.
  const escalate = () =>
    void escalator.run().catch((err: unknown) => {
      deps.storage?.report(err, "escalation");
      deps.log(`[escalation] pass failed (retried in ${TICK_MS / 1000} s): ${String(err)}`);
    });
  const timer = setInterval(() => {
    try {
      service.tick();
    } catch (err) {
      deps.storage?.report(err, "alarms");
      deps.log(`[alarms] housekeeping failed (retried in ${TICK_MS / 1000} s): ${String(err)}`);
    }
    escalate();
  }, TICK_MS);
  timer.unref();
  const escalationTimer = setInterval(() => {
    // Rule evaluations whose readings settled without a newer one (a gateway's last sample).
    try {
      service.settle();
    } catch (err) {
      deps.storage?.report(err, "alarms");
      deps.log(`[alarms] settling evaluations failed (retried in ${ESCALATION_TICK_MS / 1000} s): ${String(err)}`);
    }
    const due = escalator.nextDueAtMs();
    if (due !== null && due <= clock()) escalate();
  }, ESCALATION_TICK_MS);
  escalationTimer.unref();
  if (mailer.sinkPort)
    deps.log(
      `Mail goes to the local SMTP sink on port ${mailer.sinkPort} (admin Outbox page); set SMTP_URL to send real mail.`,
    );
  return {
    service,
    escalator,
    mailer,
    notify,
    async close() {
      clearInterval(timer);
      clearInterval(escalationTimer);
      await notify.close();
      await mailer.close();
    },
  };
}
