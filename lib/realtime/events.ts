import { z } from "zod";
import type { SiteDataState } from "@/lib/freshness";

// The one socket.io contract, imported by the server (lib/server/realtime/server.ts) and the
// browser (components/realtime). Event names are `entity:verb`; acks are { data } | { error }.

export type Ack<T> = { data: T } | { error: { code: string; message: string } };

export const joinSiteSchema = z.object({ siteId: z.string().min(1).max(100) });
export type JoinSite = z.infer<typeof joinSiteSchema>;

/** Latest values of one site's points, coalesced; values in canonical SI units. */
export interface SiteValues {
  siteId: string;
  values: Array<{
    pointId: number;
    tsMs: number;
    value: number | boolean | string;
    quality: "good" | "uncertain" | "bad";
  }>;
}

/** One site's status as the board shows it. */
export interface SiteStatus {
  siteId: string;
  data: SiteDataState;
  /** `title` is for technicians; `ownerTitle` says the same in plain words for building owners. Pushed titles carry
   * quantity tokens (lib/quantity-text.ts) that each browser renders in its viewer's units. */
  worst: {
    priority: number;
    ruleId: string;
    equipment: string;
    title: string;
    ownerTitle: string;
    active: boolean;
  } | null;
  unacknowledged: number;
}

export interface ServerToClientEvents {
  "site:values": (payload: SiteValues) => void;
  "site:status": (payload: SiteStatus) => void;
}

export interface ClientToServerEvents {
  "site:join": (payload: JoinSite, ack: (res: Ack<{ siteId: string }>) => void) => void;
  "site:leave": (payload: JoinSite, ack: (res: Ack<{ siteId: string }>) => void) => void;
  /** Status of every site the viewer may see (no values). */
  "board:join": (ack: (res: Ack<{ siteIds: string[] }>) => void) => void;
  "board:leave": (ack: (res: Ack<{ siteIds: string[] }>) => void) => void;
}

/** A site page's room: `site:values` and `site:status`. */
export const siteRoom = (siteId: string) => `site:${siteId}`;
/** The board's room for a site: `site:status` only, so a board of many plants is not sent every reading. */
export const boardRoom = (siteId: string) => `board:${siteId}`;
