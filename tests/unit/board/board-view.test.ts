import { describe, expect, it } from "vitest";
import { applyBoardView, countStates, matchesSearch, siteStates, sortSites } from "@/lib/board/board-view";
import type { BoardSiteDto } from "@/lib/dto/board";
import { boardViewQuery, defaultBoardView, parseBoardView } from "@/lib/schemas/board";
import type { SiteStatus } from "@/lib/realtime/events";

const NOW = Date.UTC(2026, 11, 3, 12, 0, 0);

function site(
  id: string,
  over: Partial<BoardSiteDto> & {
    worst?: Partial<NonNullable<SiteStatus["worst"]>> | null;
    data?: SiteStatus["data"];
  } = {},
): BoardSiteDto {
  const { worst, data, ...rest } = over;
  return {
    id,
    name: id,
    kind: "Office",
    address: "",
    timeZone: "UTC",
    customer: { id: "c", name: "Owner" },
    equipmentCount: 3,
    training: false,
    changes: null,
    openRequests: 0,
    openVisits: 0,
    status: {
      siteId: id,
      data: data ?? "live",
      unacknowledged: worst ? 1 : 0,
      worst: worst
        ? { priority: 3, ruleId: "r", equipment: "CH-1", title: "t", ownerTitle: "o", active: true, ...worst }
        : null,
    },
    ...rest,
  };
}

describe("board states", () => {
  it("puts a plant in every abnormal state it is in, and in quiet only when in none", () => {
    expect(siteStates(site("a"))).toEqual(["quiet"]);
    expect(siteStates(site("b", { worst: {}, data: "offline" }))).toEqual(["alarms", "stale"]);
    expect(
      siteStates(site("c", { data: "no_gateway", changes: { count: 1, oldestMadeAt: NOW, earliestDueAt: NOW } })),
    ).toEqual(["stale", "changes"]);
    const counts = countStates([site("a"), site("b", { worst: {}, data: "offline" }), site("c", { data: "stale" })]);
    expect(counts).toEqual({ all: 3, alarms: 1, stale: 2, changes: 0, quiet: 1 });
  });
});

describe("urgency order", () => {
  it("follows ISA-18.2 priority (1 is the most urgent) and puts active alarms before returned-unacknowledged ones", () => {
    // ANSI/ISA-18.2-2016, alarm prioritization and the alarm state model: a returned-to-normal alarm awaiting
    // acknowledgement is less urgent than one whose condition is still active.
    const list = [
      site("quiet"),
      site("p3-active", { worst: { priority: 3 } }),
      site("p1-cleared", { worst: { priority: 1, active: false } }),
      site("p1-active", { worst: { priority: 1 } }),
      site("p2-active", { worst: { priority: 2 } }),
      site("offline", { data: "offline" }),
      site("changes", { changes: { count: 1, oldestMadeAt: NOW - 3600_000, earliestDueAt: NOW + 3600_000 } }),
      site("overdue", { changes: { count: 1, oldestMadeAt: NOW - 7200_000, earliestDueAt: NOW - 60_000 } }),
      site("request", { openRequests: 1 }),
    ];
    expect(sortSites(list, "urgency", NOW).map((s) => s.id)).toEqual([
      "p1-active",
      "p1-cleared",
      "p2-active",
      "p3-active",
      "overdue",
      "offline",
      "changes",
      "request",
      "quiet",
    ]);
  });

  it("lists training plants after every real plant, in every sort", () => {
    const list = [
      site("Zebra"),
      site("Alpha drill", { training: true, worst: { priority: 1 }, customer: { id: "a", name: "Aardvark" } }),
      site("Beta", { customer: { id: "z", name: "Zed" } }),
    ];
    for (const sort of ["urgency", "name", "customer"] as const)
      expect(sortSites(list, sort, NOW).at(-1)!.id, sort).toBe("Alpha drill");
    expect(sortSites(list, "name", NOW).map((s) => s.id)).toEqual(["Beta", "Zebra", "Alpha drill"]);
    expect(sortSites(list, "customer", NOW).map((s) => s.id)).toEqual(["Zebra", "Beta", "Alpha drill"]);
  });

  it("sorts names as people read them: numbers by value, case ignored", () => {
    const list = [site("Plant 10"), site("plant 9"), site("Plant 100")];
    expect(sortSites(list, "name", NOW).map((s) => s.id)).toEqual(["plant 9", "Plant 10", "Plant 100"]);
  });
});

describe("search and filter", () => {
  it("matches every word in the site's or the customer's name, accents and case ignored", () => {
    const s = site("Café Tower", { name: "Café Tower", customer: { id: "c", name: "Riverside Health" } });
    expect(matchesSearch(s, "cafe")).toBe(true);
    expect(matchesSearch(s, "tower riverside")).toBe(true);
    expect(matchesSearch(s, "tower hospital")).toBe(false);
    expect(matchesSearch(s, "  ")).toBe(true);
  });

  it("counts the searched plants per state and shows only the chosen state", () => {
    const list = [site("North A", { worst: {} }), site("North B"), site("South C", { worst: {} })];
    const { shown, counts } = applyBoardView(list, { q: "north", state: "alarms", sort: "urgency" }, NOW);
    expect(shown.map((s) => s.id)).toEqual(["North A"]);
    expect(counts).toEqual({ all: 2, alarms: 1, stale: 0, changes: 0, quiet: 1 });
  });
});

describe("the view in the URL", () => {
  it("round-trips through the query string and leaves defaults out", () => {
    const view = { q: "mill high", state: "stale", sort: "customer", view: "list" } as const;
    const query = boardViewQuery(view);
    expect(query).toBe("?q=mill+high&state=stale&sort=customer&view=list");
    expect(parseBoardView(new URLSearchParams(query.slice(1)))).toEqual(view);
    expect(boardViewQuery(defaultBoardView)).toBe("");
  });

  it("falls back to the default for anything it cannot read", () => {
    expect(parseBoardView({ state: "bogus", sort: ["name", "customer"], view: "grid" })).toEqual({
      ...defaultBoardView,
      sort: "name",
    });
  });
});
