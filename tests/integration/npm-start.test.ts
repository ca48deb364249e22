import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, freePort, ROOT, serverMode } from "../helpers/server";

// `npm start` as an operator or a service manager runs it: a SIGTERM or SIGINT to npm must stop
// the server, or the next start finds its ports taken. npm passes the signal to its child
// (npm's run-script signal forwarding), so the child must be the server itself.

const canConnect = (port: number) =>
  new Promise<boolean>((resolve) => {
    const socket = net.connect(port, "127.0.0.1");
    socket.once("connect", () => {
      socket.destroy();
      resolve(true);
    });
    socket.once("error", () => resolve(false));
  });

async function until(what: string, fn: () => Promise<boolean>, timeoutMs: number) {
  const end = Date.now() + timeoutMs;
  while (!(await fn())) {
    if (Date.now() > end) throw new Error(`timed out: ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

describe("npm start", () => {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-npm-"));
  const distDir = `.next-test/${path.basename(dataDir)}`;
  const running: ChildProcess[] = [];
  afterAll(() => {
    // Whatever is left of a failed run: npm and everything it started share its process group.
    for (const child of running) {
      try {
        process.kill(-child.pid!, "SIGKILL");
      } catch {
        // already gone
      }
    }
    fs.rmSync(path.join(ROOT, distDir), { recursive: true, force: true });
    fs.rmSync(path.join(ROOT, `${distDir}.tsconfig.json`), { force: true });
  });

  for (const signal of ["SIGTERM", "SIGINT"] as const) {
    it(`stops the server when npm gets ${signal}, freeing both ports within 10 s`, async () => {
      const port = await freePort();
      const mqttPort = await freePort();
      const env: NodeJS.ProcessEnv = {
        ...process.env,
        LIFTLINE_NODE_ENV: serverMode(),
        HOST: "127.0.0.1",
        PORT: String(port),
        MQTT_PORT: String(mqttPort),
        DATABASE_PATH: path.join(dataDir, `${signal}.db`),
        LIFTLINE_DEMO: "1",
        LIFTLINE_DEMO_PASSWORD: DEMO_PASSWORD,
        LIFTLINE_SIMULATOR: "0",
        LIFTLINE_BUILD_IF_NEEDED: "0",
      };
      if (serverMode() === "development") {
        env.LIFTLINE_DIST_DIR = distDir;
        env.LIFTLINE_TSCONFIG = `${distDir}.tsconfig.json`;
        fs.mkdirSync(path.join(ROOT, ".next-test"), { recursive: true });
        fs.writeFileSync(path.join(ROOT, env.LIFTLINE_TSCONFIG), JSON.stringify({ extends: "../tsconfig.json" }));
      }
      for (const k of ["VITEST", "VITEST_WORKER_ID", "VITEST_POOL_ID", "NODE_ENV"]) delete env[k];
      const npm = spawn("npm", ["start"], { cwd: ROOT, env, stdio: ["ignore", "pipe", "pipe"], detached: true });
      running.push(npm);
      let out = "";
      npm.stdout!.on("data", (d) => (out += d));
      npm.stderr!.on("data", (d) => (out += d));
      const npmExited = new Promise<void>((resolve) => npm.once("exit", () => resolve()));

      await until(
        `the server answers on port ${port}\n${out}`,
        async () => (await fetch(`http://127.0.0.1:${port}/api/health`).catch(() => null))?.status === 200,
        120_000,
      );
      expect(await canConnect(mqttPort)).toBe(true);

      const stoppedAt = Date.now();
      npm.kill(signal);
      await until(
        "both ports are free",
        async () => !(await canConnect(port)) && !(await canConnect(mqttPort)),
        10_000,
      ).catch((err) => {
        throw new Error(`${err.message}\n${out}`);
      });
      console.log(`npm start, ${signal}: both ports free after ${Date.now() - stoppedAt} ms`);
      await npmExited;
      expect(out).toContain(`${signal}: shutting down`);
    }, 180_000);
  }
});
