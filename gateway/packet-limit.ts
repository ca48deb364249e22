import { Duplex } from "node:stream";

// aedes's parser (mqtt-packet) holds a packet in memory until all of it has arrived, whatever
// length its header declares. This follows the fixed headers as the bytes pass (MQTT 3.1.1 §2.2)
// and closes the connection when the first packet is not a small CONNECT or any packet is over
// the maximum, before the broker has buffered it.

export interface PacketLimits {
  /** Largest remaining length of the first packet, the CONNECT. */
  connectMaxBytes: number;
  /** Largest remaining length of any packet. */
  packetMaxBytes: number;
}

export type PacketViolation =
  | { kind: "not_connect"; packetType: number }
  | { kind: "too_large"; first: boolean; bytes: number }
  | { kind: "malformed_length" };

const CONNECT = 1;

/** Packet boundaries through a byte stream, fed chunk by chunk. */
export class PacketScanner {
  private packets = 0;
  /** Body bytes of the current packet still to pass. */
  private skip = 0;
  private inHeader = false;
  private length = 0;
  private multiplier = 1;
  private lengthBytes = 0;

  constructor(private readonly limits: PacketLimits) {}

  /** The first violation in `chunk`, or null when every header in it is within the limits. */
  feed(chunk: Uint8Array): PacketViolation | null {
    let i = 0;
    while (i < chunk.length) {
      if (this.skip > 0) {
        const n = Math.min(this.skip, chunk.length - i);
        this.skip -= n;
        i += n;
        continue;
      }
      const byte = chunk[i++];
      if (!this.inHeader) {
        // [MQTT-3.1.0-1]: the first packet a client sends is CONNECT.
        if (this.packets === 0 && byte >> 4 !== CONNECT) return { kind: "not_connect", packetType: byte >> 4 };
        this.inHeader = true;
        this.length = 0;
        this.multiplier = 1;
        this.lengthBytes = 0;
        continue;
      }
      // §2.2.3 Remaining Length: 7 bits a byte, least significant first, at most 4 bytes.
      this.length += (byte & 0x7f) * this.multiplier;
      this.multiplier *= 128;
      this.lengthBytes++;
      const first = this.packets === 0;
      const max = first ? this.limits.connectMaxBytes : this.limits.packetMaxBytes;
      if (this.length > max) return { kind: "too_large", first, bytes: this.length };
      if (byte & 0x80) {
        if (this.lengthBytes === 4) return { kind: "malformed_length" };
        continue;
      }
      this.inHeader = false;
      this.packets++;
      this.skip = this.length;
    }
    return null;
  }
}

/**
 * The connection aedes reads from and writes to: the socket's bytes pass through a
 * PacketScanner; a violation is reported and the socket destroyed.
 */
export class LimitedConnection extends Duplex {
  private readonly scanner: PacketScanner;
  private peerEnded = false;

  constructor(
    private readonly socket: Duplex,
    limits: PacketLimits,
    private readonly onViolation: (violation: PacketViolation) => void,
  ) {
    super({ allowHalfOpen: false });
    this.scanner = new PacketScanner(limits);
    socket.on("data", (chunk: Buffer) => this.admit(chunk));
    socket.on("end", () => {
      this.peerEnded = true;
      this.push(null);
    });
    socket.on("error", (err) => this.destroy(err));
    // After the peer's FIN, what is still buffered here is read before this side closes.
    socket.on("close", () => {
      if (!this.peerEnded) this.destroy();
    });
  }

  private admit(chunk: Buffer) {
    if (this.destroyed) return;
    const violation = this.scanner.feed(chunk);
    if (violation) {
      this.onViolation(violation);
      this.destroy();
      return;
    }
    if (!this.push(chunk)) this.socket.pause();
  }

  override _read() {
    this.socket.resume();
  }

  override _write(chunk: Buffer, _encoding: BufferEncoding, callback: (err?: Error | null) => void) {
    if (this.socket.destroyed || this.socket.write(chunk)) callback();
    else this.afterDrain(callback);
  }

  // mqtt-packet corks the stream while it writes a packet's parts; they leave as one write.
  override _writev(chunks: Array<{ chunk: Buffer }>, callback: (err?: Error | null) => void) {
    if (this.socket.destroyed) return callback();
    this.socket.cork();
    let flowing = true;
    for (const { chunk } of chunks) flowing = this.socket.write(chunk);
    this.socket.uncork();
    if (flowing) callback();
    else this.afterDrain(callback);
  }

  private afterDrain(callback: () => void) {
    const done = () => {
      this.socket.off("drain", done);
      this.socket.off("close", done);
      callback();
    };
    this.socket.on("drain", done);
    this.socket.on("close", done);
  }

  override _final(callback: (err?: Error | null) => void) {
    this.socket.end();
    callback();
  }

  override _destroy(err: Error | null, callback: (err?: Error | null) => void) {
    this.socket.destroy();
    callback(err);
  }
}
