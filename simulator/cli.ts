// Command line: run a scenario offline to CSV, print a point map, or publish as a gateway over MQTT.
//   npm run simulate -- --scenario power-blip --offline --duration 3h --seed 7 [--events] [--start ISO]
//   npm run simulate -- --site medical-office --print-point-map
//   npm run simulate -- --site school --scenario power-blip --speed 30 --seed 7 --mqtt-url mqtt://localhost:1883 --username U --password P
//   … --protocol sparkplug --group-id G --edge-node-id N   (a Sparkplug B 3.0 edge node instead of the JSON contract)
import { parseArgs } from "node:util";
import { z } from "zod";
import { writeCsv } from "./csv";
import { parseDurationS } from "./duration";
import { startSimulatedGateway } from "./gateway-client";
import { getLayout, siteLayouts } from "./layout";
import { pointMapCsv } from "./points";
import { runScenario } from "./run";
import { getScenario, scenarioNames, scenarios } from "./scenarios";
import { sparkplugIdSchema, sparkplugPointMapCsv } from "./sparkplug-edge";

const usage = `Usage: npm run simulate -- [options]
  --scenario <name>     ${scenarioNames.join(" | ")} (default normal-day)
  --site <name>         site layout: ${Object.keys(siteLayouts).join(" | ")} (default default)
  --seed <n>            random seed (default 1)
  --duration <d>        e.g. 3h, 90m, 1h30m, 600 (default: the scenario's own length)
  --step <s>            model step, seconds (default 1; fouled-condenser 10)
  --sample <s>          seconds between readings (default 10; fouled-condenser 300)
  --offline             write CSV ts,point,value,unit to stdout as fast as it computes
  --events              with --offline: add events as comment lines "# event,<ts>,<kind>,<equipment>,<message>"
  --start <ISO>         event time of scenario second 0 (default: so the run ends at "now")
  --print-point-map     print gateway_point,equipment,quantity,unit for the site and exit
                        (with --protocol sparkplug: the Sparkplug names, {device}/{metric})
  --list                list scenarios and sites
  --speed <x>           online: simulated seconds per wall second (default 30)
  --mqtt-url <url>      online: broker (default mqtt://localhost:1883)
  --username <u>        online: gateway credentials (or LIFTLINE_GATEWAY_USERNAME)
  --password <p>        online: (or LIFTLINE_GATEWAY_PASSWORD)
  --gateway-id <id>     online: defaults to the username
  --protocol <p>        online: json (default) | sparkplug (Sparkplug B 3.0 edge node)
  --group-id <g>        sparkplug: the node's group id, as provisioned
  --edge-node-id <n>    sparkplug: the node's edge node id, as provisioned
  --loop                online: replay the scenario when it ends
`;

/** --protocol and the Sparkplug ids (zod at the boundary); --group-id / --edge-node-id are required only online. */
const protocolArgsSchema = z.discriminatedUnion("protocol", [
  z.object({
    protocol: z.literal("json"),
    groupId: z.undefined({ error: "only with --protocol sparkplug" }),
    edgeNodeId: z.undefined({ error: "only with --protocol sparkplug" }),
  }),
  z.object({
    protocol: z.literal("sparkplug"),
    groupId: sparkplugIdSchema.optional(),
    edgeNodeId: sparkplugIdSchema.optional(),
  }),
]);
const flagOf: Record<string, string> = { protocol: "protocol", groupId: "group-id", edgeNodeId: "edge-node-id" };

function fail(msg: string): never {
  process.stderr.write(`${msg}\n\n${usage}`);
  process.exit(2);
}

function main(): void {
  let args;
  try {
    args = parseArgs({
      options: {
        scenario: { type: "string", default: "normal-day" },
        site: { type: "string", default: "default" },
        seed: { type: "string", default: "1" },
        duration: { type: "string" },
        step: { type: "string" },
        sample: { type: "string" },
        offline: { type: "boolean", default: false },
        events: { type: "boolean", default: false },
        start: { type: "string" },
        "print-point-map": { type: "boolean", default: false },
        list: { type: "boolean", default: false },
        speed: { type: "string", default: "30" },
        "mqtt-url": { type: "string", default: "mqtt://localhost:1883" },
        username: { type: "string" },
        password: { type: "string" },
        "gateway-id": { type: "string" },
        protocol: { type: "string", default: "json" },
        "group-id": { type: "string" },
        "edge-node-id": { type: "string" },
        loop: { type: "boolean", default: false },
        help: { type: "boolean", short: "h", default: false },
      },
      strict: true,
    }).values;
  } catch (e) {
    fail((e as Error).message);
  }
  if (args.help) {
    process.stdout.write(usage);
    return;
  }
  if (args.list) {
    for (const s of Object.values(scenarios))
      process.stdout.write(`scenario ${s.name} (${s.defaultDurationS / 3600} h): ${s.description}\n`);
    for (const l of Object.values(siteLayouts))
      process.stdout.write(
        `site ${l.site}: ${l.name}, ${l.chillers.map((c) => `${c.tag} ${c.capacityTons} t ${c.refrigerant}`).join(", ")}, ${l.airHandlers} AHUs\n`,
      );
    return;
  }
  const layout = getLayout(args.site) ?? fail(`unknown site "${args.site}"`);
  const wire = protocolArgsSchema.safeParse({
    protocol: args.protocol,
    groupId: args["group-id"],
    edgeNodeId: args["edge-node-id"],
  });
  if (!wire.success)
    fail(wire.error.issues.map((i) => `--${flagOf[String(i.path[0])] ?? String(i.path[0])}: ${i.message}`).join("; "));
  if (args["print-point-map"]) {
    process.stdout.write(wire.data.protocol === "sparkplug" ? sparkplugPointMapCsv(layout) : pointMapCsv(layout));
    return;
  }
  let scenario;
  try {
    scenario = getScenario(args.scenario);
  } catch (e) {
    fail((e as Error).message);
  }
  const seed = Number(args.seed);
  if (!Number.isInteger(seed)) fail("--seed must be an integer");
  const num = (name: string, v: string) => {
    const n = Number(v);
    if (!(n > 0)) fail(`--${name} must be a positive number`);
    return n;
  };
  let durationS: number;
  try {
    durationS = args.duration ? parseDurationS(args.duration) : scenario.defaultDurationS;
  } catch (e) {
    fail((e as Error).message);
  }
  const stepS = num("step", args.step ?? String(scenario.defaultStepS ?? 1));
  const sampleEveryS = num("sample", args.sample ?? String(scenario.defaultSampleS ?? 10));
  let startMs: number | undefined;
  if (args.start) {
    startMs = Date.parse(args.start);
    if (Number.isNaN(startMs)) fail(`--start "${args.start}" is not an ISO date-time`);
  }

  if (args.offline) {
    // As fast as it computes: start in the past so the last reading is "now" (never a future timestamp).
    const start = startMs ?? Math.floor((Date.now() - durationS * 1000) / 1000) * 1000;
    let buf = "";
    const flush = () => {
      if (buf) process.stdout.write(buf);
      buf = "";
    };
    process.stdout.on("error", (err: NodeJS.ErrnoException) => {
      if (err.code === "EPIPE") process.exit(0);
      throw err;
    });
    writeCsv(
      runScenario({ scenario: scenario.name, seed, startMs: start, durationS, stepS, sampleEveryS, layout }),
      layout,
      (chunk) => {
        buf += chunk;
        if (buf.length > 1 << 16) flush();
      },
      args.events,
    );
    flush();
    return;
  }

  const username = args.username ?? process.env.LIFTLINE_GATEWAY_USERNAME;
  const password = args.password ?? process.env.LIFTLINE_GATEWAY_PASSWORD;
  if (!username || !password)
    fail(
      "online mode needs --username/--password (or LIFTLINE_GATEWAY_USERNAME / LIFTLINE_GATEWAY_PASSWORD), or use --offline",
    );
  if (wire.data.protocol === "sparkplug" && (!wire.data.groupId || !wire.data.edgeNodeId))
    fail("--protocol sparkplug needs --group-id and --edge-node-id");
  const gw = startSimulatedGateway({
    mqttUrl: args["mqtt-url"],
    username,
    password,
    gatewayId: args["gateway-id"],
    ...wire.data,
    scenario: scenario.name,
    speed: num("speed", args.speed),
    seed,
    siteLayout: layout,
    durationS,
    stepS,
    sampleEveryS,
    loop: args.loop,
    startMs,
    log: (line) => process.stderr.write(line + "\n"),
  });
  const progress = setInterval(() => {
    const s = gw.status();
    process.stderr.write(
      `[${s.gatewayId}] pass ${s.pass} ${new Date(s.simulatedMs).toISOString()} ${(100 * s.fractionDone).toFixed(1)} % (${s.published} messages)${s.connected ? "" : " (not connected)"}\n`,
    );
    if (!s.running) void shutdown();
  }, 10_000);
  let stopping = false;
  const shutdown = async () => {
    if (stopping) return;
    stopping = true;
    clearInterval(progress);
    await gw.stop();
    process.exit(0);
  };
  process.on("SIGINT", () => void shutdown());
  process.on("SIGTERM", () => void shutdown());
}

main();
