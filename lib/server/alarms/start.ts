import type { Db } from "@/db/client";
import { defaultEscalationPolicy } from "@/lib/oncall/escalation";
import type { CommStatus } from "@/lib/rules";
import type { Config } from "../config";
import { createMailer, type Mailer } from "../mail";
import type { StorageHealth } from "../storage-health";
import { createEscalator, type Escalator } from "./escalation";
import { createAlarmService, type AlarmService, type SiteEvaluationSummary } from "./service";

// Starts the alarm side of the server: mail (real SMTP or the local sink), the rule checks
// with their alarm state, and the escalation timer. server.ts calls this once.

export interface AlarmSystem {
  service: AlarmService;
  escalator: Escalator;
  mailer: Mailer;
  close(): Promise<void>;
}

const TICK_MS = 15_000;

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
  const escalator = createEscalator({
    db: deps.db,
    mailer,
    clock,
    publicUrl: deps.publicUrl,
    policy: { ...defaultEscalationPolicy, delayMs: deps.config.ESCALATION_DELAY_MIN * 60_000 },
    log: deps.log,
  });
  const service = createAlarmService({
    db: deps.db,
    clock,
    comms: deps.comms,
    onEvaluated: (summary) => deps.onSiteChanged?.(summary.siteId, summary),
    onAlarmsChanged: (siteId, transitions) => {
      deps.onSiteChanged?.(siteId, null);
      if (transitions.some((t) => t.to === "unacknowledged")) escalate();
    },
    log: deps.log,
    storage: deps.storage,
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
  if (mailer.sinkPort)
    deps.log(
      `Mail goes to the local SMTP sink on port ${mailer.sinkPort} (admin Outbox page); set SMTP_URL to send real mail.`,
    );
  return {
    service,
    escalator,
    mailer,
    async close() {
      clearInterval(timer);
      await mailer.close();
    },
  };
}
