import { generate } from "mqtt-packet";
import { describe, expect, it } from "vitest";
import { PacketScanner, type PacketLimits } from "@/gateway/packet-limit";

// The fixed-header scanner in front of the broker, fed packets written by mqtt-packet (the codec
// aedes and mqtt.js use) whole, byte by byte and split at every offset. Header layout: MQTT
// 3.1.1 §2.2 (type in the high nibble of byte 1, then the Remaining Length, §2.2.3).

const limits: PacketLimits = { connectMaxBytes: 4096, packetMaxBytes: 1024 };
const connect = generate({
  cmd: "connect",
  protocolId: "MQTT",
  protocolVersion: 4,
  clientId: "gw-1",
  clean: true,
  keepalive: 60,
  username: "gw-1",
  password: Buffer.from("secret"),
});
const publish = (bytes: number) =>
  generate({ cmd: "publish", topic: "t", payload: Buffer.alloc(bytes), qos: 0, retain: false, dup: false });

function feedAll(chunks: Uint8Array[]) {
  const scanner = new PacketScanner(limits);
  for (const c of chunks) {
    const v = scanner.feed(c);
    if (v) return v;
  }
  return null;
}

const bytewise = (buf: Buffer) => [...buf].map((b) => Uint8Array.of(b));

describe("PacketScanner", () => {
  it("passes a CONNECT and packets within the limit, however the stream is split", () => {
    const stream = Buffer.concat([connect, publish(10), generate({ cmd: "pingreq" }), publish(1024 - 3)]);
    expect(feedAll([stream])).toBeNull();
    expect(feedAll(bytewise(stream))).toBeNull();
    for (let cut = 1; cut < stream.length; cut++)
      expect(feedAll([stream.subarray(0, cut), stream.subarray(cut)])).toBeNull();
  });

  it("refuses a first packet that is not CONNECT ([MQTT-3.1.0-1])", () => {
    expect(feedAll([publish(10)])).toEqual({ kind: "not_connect", packetType: 3 });
  });

  it("refuses a CONNECT over its limit and a packet over the maximum, from the header alone", () => {
    const bigConnect = generate({
      cmd: "connect",
      protocolId: "MQTT",
      protocolVersion: 4,
      clientId: "gw-1",
      clean: true,
      keepalive: 60,
      username: "gw-1",
      password: Buffer.alloc(5000),
    });
    expect(feedAll([bigConnect.subarray(0, 4)])).toMatchObject({ kind: "too_large", first: true });
    // topic length (2) + topic (1) + payload: 1022 bytes of payload is a 1025-byte remaining length
    const over = publish(1022);
    expect(feedAll([connect, over.subarray(0, 4)])).toEqual({ kind: "too_large", first: false, bytes: 1025 });
    expect(feedAll(bytewise(Buffer.concat([connect, over])))).toEqual({ kind: "too_large", first: false, bytes: 1025 });
  });

  it("refuses a Remaining Length of more than four bytes (§2.2.3)", () => {
    const scanner = new PacketScanner({ connectMaxBytes: 4096, packetMaxBytes: Number.MAX_SAFE_INTEGER });
    expect(scanner.feed(connect)).toBeNull();
    expect(scanner.feed(Uint8Array.of(0x30, 0x80, 0x80, 0x80, 0x80, 0x01))).toEqual({ kind: "malformed_length" });
  });
});
