"use client";

import { useState } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import type { CalendarFeedDto, PreferencesDto, PushDeviceDto, SmsNumberDto } from "@/lib/dto/notify";
import { fetchJson } from "@/lib/client/fetcher";

// How the person is reached: push on this device, their devices, a verified number for texts,
// a private calendar feed of their shifts (staff), and opt-in e-mails (customers).

const when = (ms: number | null) => (ms ? new Date(ms).toLocaleString() : "never");
const section = "flex flex-col gap-3 rounded-lg border border-line bg-panel p-4";

function base64UrlToBytes(value: string): Uint8Array<ArrayBuffer> {
  const b64 = value
    .replace(/-/g, "+")
    .replace(/_/g, "/")
    .padEnd(Math.ceil(value.length / 4) * 4, "=");
  const raw = atob(b64);
  const out = new Uint8Array(new ArrayBuffer(raw.length));
  for (let i = 0; i < raw.length; i++) out[i] = raw.charCodeAt(i);
  return out;
}

function PushSection() {
  const { data, mutate } = useSWR<{ devices: PushDeviceDto[] }>("/api/notify/push-subscriptions", fetchJson);
  const [label, setLabel] = useState("My phone");
  const [message, setMessage] = useState<string | null>(null);

  async function enable() {
    setMessage(null);
    try {
      if (!("serviceWorker" in navigator) || !("PushManager" in window))
        throw new Error("This browser cannot receive push notifications. Add Liftline to the home screen first.");
      if ((await Notification.requestPermission()) !== "granted")
        throw new Error("Notifications are blocked for Liftline in this browser's settings.");
      const { publicKey } = await fetchJson<{ publicKey: string }>("/api/notify/push-key");
      const registration = await navigator.serviceWorker.register("/sw.js", { scope: "/" });
      await navigator.serviceWorker.ready;
      const subscription = await registration.pushManager.subscribe({
        userVisibleOnly: true,
        applicationServerKey: base64UrlToBytes(publicKey),
      });
      const json = subscription.toJSON() as { endpoint: string; keys: { p256dh: string; auth: string } };
      await fetchJson("/api/notify/push-subscriptions", {
        method: "POST",
        body: JSON.stringify({ endpoint: json.endpoint, keys: json.keys, label }),
      });
      setMessage("Notifications are on for this device.");
      await mutate();
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  async function remove(id: string) {
    await fetchJson(`/api/notify/push-subscriptions/${id}`, { method: "DELETE" }).catch((err: Error) =>
      setMessage(err.message),
    );
    await mutate();
  }

  return (
    <div className={section} data-testid="push-settings">
      <h2 className="font-semibold">Push notifications</h2>
      <p className="text-sm text-muted">
        Alarms reach this device even when Liftline is closed. On a phone, add Liftline to the home screen first.
      </p>
      <label className="flex flex-col gap-1 text-sm font-semibold">
        Device name
        <input
          className="min-h-11 rounded border border-line bg-panel px-3 text-base font-normal"
          value={label}
          maxLength={60}
          onChange={(e) => setLabel(e.target.value)}
        />
      </label>
      <Button type="button" className="self-start" onClick={() => void enable()}>
        Enable on this device
      </Button>
      {message ? (
        <p role="status" className="text-sm" data-testid="push-message">
          {message}
        </p>
      ) : null}
      <ul className="flex flex-col gap-2" data-testid="push-devices">
        {(data?.devices ?? []).map((d) => (
          <li key={d.id} className="flex items-center justify-between gap-2 text-sm">
            <span>
              <strong>{d.label}</strong> · {d.service} · last delivered {when(d.lastSuccessAt)}
            </span>
            <Button type="button" variant="secondary" onClick={() => void remove(d.id)}>
              Remove
            </Button>
          </li>
        ))}
      </ul>
    </div>
  );
}

function SmsSection() {
  const { data, mutate } = useSWR<{ number: SmsNumberDto | null }>("/api/notify/sms-number", fetchJson);
  const [phone, setPhone] = useState("");
  const [code, setCode] = useState("");
  const [message, setMessage] = useState<string | null>(null);
  const number = data?.number ?? null;

  async function run(fn: () => Promise<unknown>, done: string) {
    setMessage(null);
    try {
      await fn();
      setMessage(done);
      await mutate();
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  return (
    <div className={section} data-testid="sms-settings">
      <h2 className="font-semibold">Text messages</h2>
      {number ? (
        <p className="text-sm">
          {number.phone} · {number.verified ? "verified" : "not verified"}
          {number.verified ? ` · alarm texts ${number.alarmsEnabled ? "on" : "off"}` : ""}
        </p>
      ) : (
        <p className="text-sm text-muted">No number yet.</p>
      )}
      <label className="flex flex-col gap-1 text-sm font-semibold">
        Mobile number (international form)
        <input
          className="min-h-11 rounded border border-line bg-panel px-3 text-base font-normal"
          value={phone}
          placeholder="+15555550123"
          inputMode="tel"
          onChange={(e) => setPhone(e.target.value)}
        />
      </label>
      <Button
        type="button"
        className="self-start"
        onClick={() =>
          void run(
            () => fetchJson("/api/notify/sms-number", { method: "PUT", body: JSON.stringify({ phone }) }),
            "A code was texted to the number.",
          )
        }
      >
        Text me a code
      </Button>
      {number && !number.verified ? (
        <div className="flex items-end gap-2">
          <label className="flex flex-col gap-1 text-sm font-semibold">
            Code
            <input
              className="min-h-11 rounded border border-line bg-panel px-3 text-base font-normal"
              value={code}
              inputMode="numeric"
              maxLength={6}
              onChange={(e) => setCode(e.target.value)}
            />
          </label>
          <Button
            type="button"
            onClick={() =>
              void run(
                () => fetchJson("/api/notify/sms-number/verify", { method: "POST", body: JSON.stringify({ code }) }),
                "Verified: alarm texts are on.",
              )
            }
          >
            Verify
          </Button>
        </div>
      ) : null}
      {number?.verified ? (
        <Button
          type="button"
          className="self-start"
          onClick={() =>
            void run(
              () =>
                fetchJson("/api/notify/sms-number", {
                  method: "PATCH",
                  body: JSON.stringify({ alarmsEnabled: !number.alarmsEnabled }),
                }),
              number.alarmsEnabled ? "Alarm texts are off." : "Alarm texts are on.",
            )
          }
        >
          {number.alarmsEnabled ? "Turn alarm texts off" : "Turn alarm texts on"}
        </Button>
      ) : null}
      {number ? (
        <Button
          type="button"
          className="self-start"
          onClick={() =>
            void run(() => fetchJson("/api/notify/sms-number", { method: "DELETE" }), "The number was removed.")
          }
        >
          Remove number
        </Button>
      ) : null}
      {message ? (
        <p role="status" className="text-sm">
          {message}
        </p>
      ) : null}
    </div>
  );
}

function CalendarSection() {
  const { data, mutate } = useSWR<{ feeds: CalendarFeedDto[] }>("/api/notify/calendar-feeds", fetchJson);
  const [url, setUrl] = useState<string | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  async function create() {
    try {
      const res = await fetchJson<{ url: string }>("/api/notify/calendar-feeds", { method: "POST" });
      setUrl(res.url);
      await mutate();
    } catch (err) {
      setMessage((err as Error).message);
    }
  }
  async function revoke(id: string) {
    await fetchJson(`/api/notify/calendar-feeds/${id}`, { method: "DELETE" }).catch((err: Error) =>
      setMessage(err.message),
    );
    await mutate();
  }
  return (
    <div className={section} data-testid="calendar-settings">
      <h2 className="font-semibold">On-call calendar</h2>
      <p className="text-sm text-muted">
        A private link your phone&apos;s calendar subscribes to: your own shifts. Anyone with the link can read them, so
        revoke it if it leaks.
      </p>
      <Button type="button" className="self-start" onClick={() => void create()}>
        New calendar link
      </Button>
      {url ? (
        <p className="break-all text-sm" data-testid="calendar-url">
          Copy it now (shown once): <code>{url}</code>
        </p>
      ) : null}
      <ul className="flex flex-col gap-2">
        {(data?.feeds ?? []).map((f) => (
          <li key={f.id} className="flex items-center justify-between gap-2 text-sm">
            <span>
              Created {when(f.createdAt)}
              {f.revokedAt ? ` · revoked ${when(f.revokedAt)}` : ""}
            </span>
            {f.revokedAt ? null : (
              <Button type="button" variant="danger" onClick={() => void revoke(f.id)}>
                Revoke
              </Button>
            )}
          </li>
        ))}
      </ul>
      {message ? <p className="text-sm">{message}</p> : null}
    </div>
  );
}

function PreferencesSection() {
  const { data, mutate } = useSWR<{ preferences: PreferencesDto }>("/api/notify/preferences", fetchJson);
  const prefs = data?.preferences;
  async function save(next: PreferencesDto) {
    await fetchJson("/api/notify/preferences", { method: "PUT", body: JSON.stringify(next) });
    await mutate();
  }
  if (!prefs) return null;
  return (
    <div className={section} data-testid="preference-settings">
      <h2 className="font-semibold">E-mail me</h2>
      <label className="flex min-h-11 items-center gap-2">
        <input
          type="checkbox"
          checked={prefs.alarmStartEndMail}
          onChange={(e) => void save({ ...prefs, alarmStartEndMail: e.target.checked })}
        />
        When a high or critical alarm starts or ends at one of our sites
      </label>
      <label className="flex min-h-11 items-center gap-2">
        <input
          type="checkbox"
          checked={prefs.serviceRequestMail}
          onChange={(e) => void save({ ...prefs, serviceRequestMail: e.target.checked })}
        />
        When one of our service requests changes state
      </label>
    </div>
  );
}

export function NotificationSettings({ staff }: { staff: boolean }) {
  return (
    <section className="flex flex-col gap-4" aria-labelledby="notifications-title">
      <h2 id="notifications-title" className="text-xl font-semibold">
        Notifications
      </h2>
      {staff ? (
        <>
          <PushSection />
          <SmsSection />
          <CalendarSection />
        </>
      ) : (
        <PreferencesSection />
      )}
    </section>
  );
}
