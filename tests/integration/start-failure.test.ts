import { spawn } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, freePort, ROOT, SERVER_NODE_FLAGS, serverMode } from "../helpers/server";

// A start-up that fails half-way stops what it started: with the HTTP port already taken the
// server exits non-zero, says which port, and leaves no MQTT port open behind it.

const canConnect = (port: number) =>
  new Promise<boolean>((resolve) => {
    const socket = net.connect(port, "127.0.0.1");
    socket.once("connect", () => {
      socket.destroy();
      resolve(true);
    });
    socket.once("error", () => resolve(false));
  });

describe("a failed start-up", () => {
  const blocker = net.createServer();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-start-"));
  afterAll(() => {
    blocker.close();
    fs.rmSync(path.join(ROOT, ".next-test", path.basename(dataDir)), { recursive: true, force: true });
    fs.rmSync(path.join(ROOT, ".next-test", `${path.basename(dataDir)}.tsconfig.json`), { force: true });
  });

  it("exits non-zero naming the taken HTTP port and frees the MQTT port it had opened", async () => {
    const httpPort = await freePort();
    await new Promise<void>((resolve) => blocker.listen(httpPort, "127.0.0.1", resolve));
    const mqttPort = await freePort();
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      NODE_ENV: serverMode(),
      HOST: "127.0.0.1",
      PORT: String(httpPort),
      MQTT_PORT: String(mqttPort),
      DATABASE_PATH: path.join(dataDir, "liftline.db"),
      LIFTLINE_DEMO: "1",
      LIFTLINE_DEMO_PASSWORD: DEMO_PASSWORD,
      LIFTLINE_SIMULATOR: "0",
      LIFTLINE_BUILD_IF_NEEDED: "0",
      NEXT_TELEMETRY_DISABLED: "1",
    };
    if (env.NODE_ENV === "development") {
      env.LIFTLINE_DIST_DIR = `.next-test/${path.basename(dataDir)}`;
      env.LIFTLINE_TSCONFIG = `${env.LIFTLINE_DIST_DIR}.tsconfig.json`;
      fs.mkdirSync(path.join(ROOT, ".next-test"), { recursive: true });
      fs.writeFileSync(path.join(ROOT, env.LIFTLINE_TSCONFIG), JSON.stringify({ extends: "../tsconfig.json" }));
    }
    for (const k of ["VITEST", "VITEST_WORKER_ID", "VITEST_POOL_ID"]) delete env[k];
    const child = spawn(
      process.execPath,
      [...SERVER_NODE_FLAGS, "--import", "tsx", "--import", "./lib/server/server-only-hook.mjs", "server.ts"],
      { cwd: ROOT, env, stdio: ["ignore", "pipe", "pipe"] },
    );
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    const exited = new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code)));

    const startedAt = Date.now();
    const code = await Promise.race([exited, new Promise<"running">((r) => setTimeout(() => r("running"), 90_000))]);
    if (code === "running") child.kill("SIGKILL");
    console.log(`start-up failure: exited with ${code} after ${Date.now() - startedAt} ms`);
    expect(code, out).toBe(1);
    expect(out).toMatch(new RegExp(`Could not listen for HTTP on 127\\.0\\.0\\.1 port ${httpPort}: .*EADDRINUSE`));
    // The broker had started (it starts before HTTP listens) and was stopped, in reverse order.
    expect(out).toMatch(
      /Start-up failed; stopping: (the drills, the simulation, )?the gateway side, the temporary-change reminders, the storage alarm, the alarm system, .*the database/,
    );
    expect(await canConnect(mqttPort), "the MQTT port is free again").toBe(false);
  }, 120_000);
});
