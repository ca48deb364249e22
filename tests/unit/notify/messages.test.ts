import { describe, expect, it } from "vitest";
import { MAX_PUSH_LINE, pushPayload, smsText } from "@/lib/notify/messages";
import { dueStepsFor, nextStepAtMs } from "@/lib/notify/policy";
import { alarmShortCode, SHORT_CODE_LENGTH, shortCodeInReply } from "@/lib/notify/short-code";

const notice = {
  alarmId: "a1",
  siteName: "Millbrook High School",
  equipment: "CH-1",
  priority: 1,
  line: "Chilled and condenser water cross in about 12 min; the chiller is locked out by its anti-recycle timer. ".repeat(
    3,
  ),
};

describe("notification texts", () => {
  it("keeps a text to one SMS segment: 160 GSM-7 characters (3GPP TS 23.038)", () => {
    const text = smsText(notice, "7KQ3P");
    expect(text.length).toBeLessThanOrEqual(160);
    expect(text).toMatch(/^Liftline P1 Millbrook High School CH-1: /);
    expect(text).toMatch(/Reply 7KQ3P to acknowledge\.$/);
    // GSM 03.38 basic alphabet only (the ellipsis counts as two in GSM-7, so check it is the only extra).
    expect(text.replace("…", "")).toMatch(/^[A-Za-z0-9 .,:;'()+\-?!&%/]*$/);
  });

  it("keeps a push payload well under the 4096-byte push message limit (RFC 8030 §7.2)", () => {
    const payload = pushPayload(notice, {
      open: "https://x.example/alarms/a1",
      ack: `https://x.example/api/ack-links/${"t".repeat(43)}`,
    });
    expect(Buffer.byteLength(JSON.stringify(payload))).toBeLessThan(1024);
    expect(payload.body.length).toBeLessThanOrEqual(MAX_PUSH_LINE + "CH-1: ".length);
    expect(payload.title).toBe("Critical · Millbrook High School");
  });
});

describe("short codes", () => {
  it("are stable per activation, differ between activations, and are found in a loose reply", () => {
    const a = alarmShortCode("alarm-1", 1);
    expect(a).toHaveLength(SHORT_CODE_LENGTH);
    expect(alarmShortCode("alarm-1", 1)).toBe(a);
    expect(alarmShortCode("alarm-1", 2)).not.toBe(a);
    expect(shortCodeInReply(`ack ${a.toLowerCase()}.`)).toBe(a);
    expect(shortCodeInReply("ok thanks")).toBeNull();
  });

  it("rarely collide: 1000 alarms give (nearly) 1000 codes", () => {
    const codes = new Set(Array.from({ length: 1000 }, (_, i) => alarmShortCode(`alarm-${i}`, 1)));
    // 31^5 ≈ 28.6 M codes: the birthday bound for 1000 is ~1.7 % for one collision.
    expect(codes.size).toBeGreaterThanOrEqual(998);
  });
});

describe("due steps", () => {
  const policy = { priority: 1, paths: ["push" as const], backupAfterS: 180, adminsAfterS: 360 };
  it("steps fall due at their delays from the first notification, once each", () => {
    expect(dueStepsFor({ policy, waitingForAck: true, firstSentAtMs: null, sent: new Set(), nowMs: 0 })).toEqual([0]);
    expect(dueStepsFor({ policy, waitingForAck: true, firstSentAtMs: 0, sent: new Set([0]), nowMs: 179_999 })).toEqual(
      [],
    );
    expect(dueStepsFor({ policy, waitingForAck: true, firstSentAtMs: 0, sent: new Set([0]), nowMs: 180_000 })).toEqual([
      1,
    ]);
    expect(
      dueStepsFor({ policy, waitingForAck: true, firstSentAtMs: 0, sent: new Set([0, 1]), nowMs: 360_000 }),
    ).toEqual([2]);
    expect(dueStepsFor({ policy, waitingForAck: false, firstSentAtMs: 0, sent: new Set([0]), nowMs: 999_999 })).toEqual(
      [],
    );
    expect(nextStepAtMs(policy, 1000, new Set([0]))).toBe(181_000);
    expect(nextStepAtMs(policy, 1000, new Set([0, 1, 2]))).toBeNull();
  });
});
