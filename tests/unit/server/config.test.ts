import { describe, expect, it } from "vitest";
import { loadConfig as loadConfigFrom } from "@/lib/server/config";

const loadConfig = (env: Record<string, string>) => loadConfigFrom({ NODE_ENV: "production", ...env });

describe("API rate limits in the configuration", () => {
  it("default to 120 writes and 600 trend requests a minute per caller", () => {
    const c = loadConfig({});
    expect([c.API_WRITES_PER_MIN, c.API_TRENDS_PER_MIN]).toEqual([120, 600]);
    expect(() => loadConfig({ API_WRITES_PER_MIN: "0" })).toThrow(/API_WRITES_PER_MIN/);
  });
});

describe("HTTP timeouts in the configuration", () => {
  it("default to 10 s for headers, 30 s for a whole request and 5 s idle between kept-alive requests", () => {
    const c = loadConfig({});
    expect([c.HTTP_HEADERS_TIMEOUT_MS, c.HTTP_REQUEST_TIMEOUT_MS, c.HTTP_KEEP_ALIVE_TIMEOUT_MS]).toEqual([
      10_000, 30_000, 5_000,
    ]);
  });

  it("refuse a headers timeout longer than the request timeout (Node.js http: ERR_OUT_OF_RANGE otherwise)", () => {
    expect(() => loadConfig({ HTTP_HEADERS_TIMEOUT_MS: "40000" })).toThrow(/HTTP_HEADERS_TIMEOUT_MS/);
  });
});
