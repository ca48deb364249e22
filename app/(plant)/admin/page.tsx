import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../(auth)/auth";

export const metadata: Metadata = { title: "Admin" };

const sections = [
  {
    href: "/admin/setup",
    title: "Set up",
    text: "The checklist for putting a customer's plant on Liftline, and what is done.",
  },
  {
    href: "/admin/customers",
    title: "Customers and sites",
    text: "Add, edit and retire customers and their sites; each site's equipment records and chiller limits.",
  },
  {
    href: "/admin/gateways",
    title: "Gateways",
    text: "Provision site gateways, rotate or revoke their credentials, upload point maps, see their counters.",
  },
  {
    href: "/admin/simulator",
    title: "Simulated sites",
    text: "Run a plant scenario on a demo site at a chosen speed; training drills.",
  },
  {
    href: "/admin/alarm-health",
    title: "Alarm-system health",
    text: "Alarm rates, floods, frequent, chattering and stale alarms, priority split.",
  },
  {
    href: "/admin/people",
    title: "People",
    text: "Invite technicians, administrators and customer users; change roles; disable or re-enable accounts.",
  },
  { href: "/admin/audit", title: "Audit log", text: "Every administrative change: who, when, before → after." },
  { href: "/admin/outbox", title: "Outbox", text: "E-mail caught by the local SMTP sink." },
  { href: "/admin/texts", title: "Texts", text: "Text messages caught by the local fake SMS API, and replies." },
  {
    href: "/admin/escalation",
    title: "Escalation",
    text: "Paths and delays per alarm priority, with the defaults' reasons.",
  },
  { href: "/on-call", title: "On-call rota", text: "Who is primary and backup, by day or week." },
  { href: "/api-docs", title: "API", text: "The REST API, described in OpenAPI 3.1." },
];

export default async function AdminPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  return (
    <section>
      <h1 className="mb-4 text-2xl font-semibold">Admin</h1>
      <ul className="grid gap-3 sm:grid-cols-2">
        {sections.map((s) => (
          <li key={s.href}>
            <Link href={s.href} className="block rounded-lg border border-line bg-panel p-4 hover:border-ink">
              <h2 className="font-semibold">{s.title}</h2>
              <p className="mt-1 text-sm text-muted">{s.text}</p>
            </Link>
          </li>
        ))}
      </ul>
    </section>
  );
}
