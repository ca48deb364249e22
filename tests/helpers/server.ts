import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import http from "node:http";
import net from "node:net";
import os from "node:os";
import path from "node:path";

// Starts the real server.ts on ephemeral ports with a temporary database, the way
// integration and browser tests need it. Production mode when a build exists (the test
// runner builds first), development mode otherwise.

export const ROOT = path.resolve(import.meta.dirname, "..", "..");
export const DEMO_PASSWORD = "test-demo-password";

/**
 * As in package.json's start script: a 64 MB young generation lets readings in flight (a flush,
 * the worker's answer, the live push) die young instead of being promoted and collected again.
 */
export const SERVER_NODE_FLAGS = ["--max-semi-space-size=64"];

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

export interface TestServer {
  url: string;
  port: number;
  mqttPort: number;
  mqttUrl: string;
  dataDir: string;
  databasePath: string;
  output: () => string;
  /** Stops the process; `signal` lets a test kill it hard. */
  stop(signal?: NodeJS.Signals): Promise<void>;
  process: ChildProcess;
}

export interface StartOptions {
  env?: Record<string, string>;
  /** Reuse a data directory (restart tests). */
  dataDir?: string;
  timeoutMs?: number;
}

interface ReadyMessage {
  type: "ready";
  url: string;
  httpPort: number;
  mqttPort: number | null;
}

export function serverMode(): "production" | "development" {
  if (process.env.LIFTLINE_TEST_SERVER_MODE === "development") return "development";
  return fs.existsSync(path.join(ROOT, ".next", "BUILD_ID")) ? "production" : "development";
}

export async function startServer(opts: StartOptions = {}): Promise<TestServer> {
  const dataDir = opts.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), "liftline-test-"));
  const port = await freePort();
  const mqttPort = await freePort();
  const databasePath = path.join(dataDir, "liftline.db");
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: serverMode(),
    HOST: "127.0.0.1",
    PORT: String(port),
    MQTT_PORT: String(mqttPort),
    DATABASE_PATH: databasePath,
    NEXTAUTH_URL: `http://localhost:${port}`,
    LIFTLINE_DEMO: "1",
    LIFTLINE_DEMO_PASSWORD: DEMO_PASSWORD,
    LIFTLINE_SIMULATOR: "0",
    LIFTLINE_BUILD_IF_NEEDED: "0",
    NEXT_TELEMETRY_DISABLED: "1",
    // The local sinks get ports chosen here too: left to the OS, one could take the HTTP or MQTT port
    // between a stop and a restart on the same ports (the durability tests).
    SMTP_PORT: String(await freePort()),
    PUSH_SINK_PORT: String(await freePort()),
    SMS_SINK_PORT: String(await freePort()),
    ...opts.env,
  };
  if (env.NODE_ENV === "development") {
    const distDir = `.next-test/${path.basename(dataDir)}`;
    env.LIFTLINE_DIST_DIR = distDir;
    // Next adds each build folder's type paths to the tsconfig it reads; a throwaway one that
    // extends the project's keeps those lines out of tsconfig.json.
    fs.mkdirSync(path.join(ROOT, ".next-test"), { recursive: true });
    env.LIFTLINE_TSCONFIG = `${distDir}.tsconfig.json`;
    fs.writeFileSync(path.join(ROOT, env.LIFTLINE_TSCONFIG), JSON.stringify({ extends: "../tsconfig.json" }, null, 2));
  }
  delete env.VITEST;
  delete env.VITEST_WORKER_ID;
  delete env.VITEST_POOL_ID;
  // The Node flags of `npm start` (package.json), and LIFTLINE_TEST_NODE_ARGS for more (e.g.
  // --cpu-prof for benchmarks).
  const nodeArgs = [...SERVER_NODE_FLAGS, ...(process.env.LIFTLINE_TEST_NODE_ARGS ?? "").split(" ").filter(Boolean)];
  // The IPC channel carries server.ts's readiness message with the ports it listens on.
  const child = spawn(
    process.execPath,
    [...nodeArgs, "--import", "tsx", "--import", "./lib/server/server-only-hook.mjs", "server.ts"],
    { cwd: ROOT, env, stdio: ["ignore", "pipe", "pipe", "ipc"] },
  );
  // A caller that dies without stop() (an uncaught error in a benchmark) must not leave a server
  // behind: four once kept running for an hour and took a fifth of a core from later bench runs.
  const killOnExit = () => child.kill("SIGKILL");
  process.on("exit", killOnExit);
  child.once("exit", () => process.off("exit", killOnExit));
  let out = "";
  child.stdout!.on("data", (d) => (out += d));
  child.stderr!.on("data", (d) => (out += d));
  // LIFTLINE_TEST_SERVER_LOG=1 shows the server's own output while a test runs (for debugging one file).
  if (process.env.LIFTLINE_TEST_SERVER_LOG) {
    child.stderr!.on("data", (d) => process.stderr.write(d));
    child.stdout!.on("data", (d) => process.stderr.write(d));
  }

  const ready = await new Promise<ReadyMessage>((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`server did not start in time:\n${out}`)),
      opts.timeoutMs ?? 120_000,
    );
    child.on("message", (m: ReadyMessage) => {
      if (m?.type !== "ready") return;
      clearTimeout(timer);
      resolve(m);
    });
    child.once("exit", (code) => {
      clearTimeout(timer);
      reject(new Error(`server exited with ${code}:\n${out}`));
    });
  });
  // Nothing more comes over IPC; an open channel would keep the test process waiting.
  child.disconnect();

  const url = `http://localhost:${ready.httpPort}`;
  return {
    url,
    port: ready.httpPort,
    mqttPort: ready.mqttPort ?? mqttPort,
    mqttUrl: `mqtt://127.0.0.1:${ready.mqttPort ?? mqttPort}`,
    dataDir,
    databasePath,
    output: () => out,
    process: child,
    async stop(signal: NodeJS.Signals = "SIGTERM") {
      if (child.exitCode !== null || child.signalCode !== null) return;
      const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
      child.kill(signal);
      await exited;
      if (env.LIFTLINE_DIST_DIR) fs.rmSync(path.join(ROOT, env.LIFTLINE_DIST_DIR), { recursive: true, force: true });
      if (env.LIFTLINE_TSCONFIG) fs.rmSync(path.join(ROOT, env.LIFTLINE_TSCONFIG), { force: true });
    },
  };
}

export interface SignInOptions {
  /** Extra request headers (X-Forwarded-For). */
  headers?: Record<string, string>;
  /** The local address the request leaves from (127.0.0.2 to play a proxy on another loopback address). */
  localAddress?: string;
}

interface RawResponse {
  status: number;
  setCookies: string[];
  location: string | null;
  contentType: string;
  body: string;
}

/** A plain node:http request, for what fetch cannot set (the local address). */
function rawRequest(
  url: string,
  init: { method: string; headers: Record<string, string>; body: string; localAddress?: string },
): Promise<RawResponse> {
  return new Promise((resolve, reject) => {
    const req = http.request(
      url,
      { method: init.method, headers: init.headers, localAddress: init.localAddress },
      (res) => {
        let body = "";
        res.setEncoding("utf8");
        res.on("data", (d) => (body += d));
        res.on("end", () =>
          resolve({
            status: res.statusCode ?? 0,
            setCookies: res.headers["set-cookie"] ?? [],
            location: res.headers.location ?? null,
            contentType: res.headers["content-type"] ?? "",
            body,
          }),
        );
      },
    );
    req.on("error", reject);
    req.end(init.body);
  });
}

/** Signs in through next-auth's credentials endpoint; returns the session cookie header. */
export async function signIn(
  baseUrl: string,
  email: string,
  password = DEMO_PASSWORD,
  opts: SignInOptions = {},
): Promise<{ status: number; cookie: string | null; error: string | null }> {
  const csrfRes = await fetch(`${baseUrl}/api/auth/csrf`);
  const jar = cookieJar(csrfRes.headers.getSetCookie());
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await rawRequest(`${baseUrl}/api/auth/callback/credentials`, {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar, ...opts.headers },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }).toString(),
    localAddress: opts.localAddress,
  });
  const session = res.setCookies.find((c) => c.startsWith("next-auth.session-token="));
  let error: string | null = null;
  if (res.location) error = new URL(res.location, baseUrl).searchParams.get("error");
  else if (res.contentType.includes("json")) {
    const body = JSON.parse(res.body) as { url?: string };
    if (body.url) error = new URL(body.url, baseUrl).searchParams.get("error");
  }
  return { status: res.status, cookie: session ? session.split(";")[0] : null, error };
}

/** Signs out through next-auth's endpoint with its CSRF token, as the sign-out button does. */
export async function signOut(baseUrl: string, sessionCookie: string): Promise<number> {
  const csrfRes = await fetch(`${baseUrl}/api/auth/csrf`, { headers: { cookie: sessionCookie } });
  const jar = [sessionCookie, cookieJar(csrfRes.headers.getSetCookie())].filter(Boolean).join("; ");
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await fetch(`${baseUrl}/api/auth/signout`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar },
    body: new URLSearchParams({ csrfToken, json: "true" }),
  });
  return res.status;
}

function cookieJar(setCookies: string[]): string {
  return setCookies.map((c) => c.split(";")[0]).join("; ");
}
