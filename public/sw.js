/* global self, caches, fetch, Response, URL */
// Liftline's service worker: alarm pushes with Open and Acknowledge, and an offline page that
// shows the last board the app saw, marked not live. It caches no pages and no API answers: the
// only stored data is the board snapshot the page writes, which signing out deletes (and which is
// deleted here too when a page load finds the session gone).

const SNAPSHOT_CACHE = "liftline-board";
const SNAPSHOT_KEY = "/__liftline/board-snapshot";

self.addEventListener("install", () => self.skipWaiting());
self.addEventListener("activate", (event) => event.waitUntil(self.clients.claim()));

const escapeHtml = (s) =>
  String(s).replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]);

async function offlinePage() {
  const cache = await caches.open(SNAPSHOT_CACHE);
  const stored = await cache.match(SNAPSHOT_KEY);
  const snapshot = stored ? await stored.json() : null;
  const rows = snapshot
    ? snapshot.sites
        .map(
          (s) =>
            `<li><strong>${escapeHtml(s.name)}</strong> <span>${escapeHtml(s.data)}</span>${
              s.alarm ? `<div class="alarm">${escapeHtml(s.alarm)}</div>` : ""
            }</li>`,
        )
        .join("")
    : "";
  const saved = snapshot ? new Date(snapshot.savedAt) : null;
  const body = snapshot
    ? `<p class="banner" data-testid="not-live">Offline — not live. This is the board as it was at <time datetime="${saved.toISOString()}">${escapeHtml(
        saved.toLocaleString(),
      )}</time>.</p><ul>${rows}</ul>`
    : `<p class="banner" data-testid="not-live">Offline — not live. No board has been saved on this device yet.</p>`;
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Offline · Liftline</title><style>body{font-family:system-ui,sans-serif;margin:0;padding:16px;background:#f5f7fa;color:#13202c}.banner{background:#fff4e5;border:2px solid #b45309;padding:12px;border-radius:6px;font-weight:600}ul{list-style:none;padding:0}li{background:#fff;margin:8px 0;padding:12px;border-radius:6px;border:1px solid #d0d7de}li span{color:#57606a;margin-left:8px}.alarm{margin-top:4px;color:#b42318}</style></head><body><h1>Liftline</h1>${body}<p>Reconnect to see live values and alarms.</p></body></html>`;
  return new Response(html, {
    headers: {
      "content-type": "text/html; charset=utf-8",
      // This page runs no script at all.
      "content-security-policy": "default-src 'none'; style-src 'unsafe-inline'; img-src 'self'",
      "cache-control": "no-store",
    },
  });
}

self.addEventListener("fetch", (event) => {
  const request = event.request;
  if (request.mode !== "navigate") return;
  event.respondWith(
    fetch(request)
      .then((response) => {
        // Redirected to sign-in: the session is gone, and so must be what it could read.
        if (response.redirected && new URL(response.url).pathname.startsWith("/sign-in"))
          event.waitUntil(caches.delete(SNAPSHOT_CACHE));
        return response;
      })
      .catch(() => offlinePage()),
  );
});

self.addEventListener("message", (event) => {
  if (event.data && event.data.type === "signed-out") event.waitUntil(caches.delete(SNAPSHOT_CACHE));
});

self.addEventListener("push", (event) => {
  let p;
  try {
    p = event.data.json();
  } catch {
    return;
  }
  event.waitUntil(
    self.registration.showNotification(p.title, {
      body: p.body,
      tag: p.alarmId,
      renotify: true,
      // A critical alarm stays on screen until the person acts on it.
      requireInteraction: p.priority <= 1,
      icon: "/icons/icon-192.png",
      badge: "/icons/icon-192.png",
      data: p,
      actions: [
        { action: "open", title: "Open" },
        { action: "ack", title: "Acknowledge" },
      ],
    }),
  );
});

self.addEventListener("notificationclick", (event) => {
  const p = event.notification.data || {};
  event.notification.close();
  if (event.action === "ack" && p.ackUrl) {
    event.waitUntil(
      fetch(`${p.ackUrl}?via=push`, { method: "POST", credentials: "omit" })
        .then((res) =>
          self.registration.showNotification(res.ok ? "Acknowledged" : "Not acknowledged", {
            body: res.ok
              ? `${p.site} ${p.equipment}: escalation stopped.`
              : "The link was used or expired. Open the alarm in Liftline.",
            tag: `${p.alarmId}-ack`,
            icon: "/icons/icon-192.png",
          }),
        )
        .catch(() => self.clients.openWindow(p.url || "/")),
    );
    return;
  }
  event.waitUntil(self.clients.openWindow(p.url || "/"));
});
