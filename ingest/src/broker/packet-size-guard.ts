import { Duplex, Transform, type TransformCallback } from 'node:stream';

/** Raised when a packet's declared length is over the limit; the connection is then cut. */
export class PacketTooLargeError extends Error {
  constructor(
    readonly declaredBytes: number,
    readonly limitBytes: number,
  ) {
    super(`MQTT packet of ${declaredBytes} bytes is over the limit of ${limitBytes} bytes`);
  }
}

/**
 * Follows the MQTT framing (fixed header byte, then the "remaining length" in 1–4 bytes of 7
 * bits, MQTT 3.1.1 §2.2.3) of an incoming byte stream and fails as soon as a packet declares
 * more than `maxBytes`. aedes's parser (mqtt-packet) has no such limit and would buffer up to
 * 256 MB for one packet, so this sits in front of `broker.handle`.
 */
export class PacketSizeCheck extends Transform {
  /** Bytes of the current packet body still to pass; -1 while reading a header. */
  private bodyLeft = -1;
  private headerBytes = 0;
  private length = 0;
  private multiplier = 1;

  constructor(private readonly maxBytes: number) {
    super();
  }

  override _transform(chunk: Buffer, _encoding: BufferEncoding, callback: TransformCallback): void {
    let i = 0;
    while (i < chunk.length) {
      if (this.bodyLeft > 0) {
        const take = Math.min(this.bodyLeft, chunk.length - i);
        this.bodyLeft -= take;
        i += take;
        if (this.bodyLeft === 0) this.bodyLeft = -1;
        continue;
      }
      const byte = chunk[i]!;
      i += 1;
      if (this.headerBytes === 0) {
        // packet type and flags
        this.headerBytes = 1;
        this.length = 0;
        this.multiplier = 1;
        continue;
      }
      this.headerBytes += 1;
      this.length += (byte & 0x7f) * this.multiplier;
      this.multiplier *= 128;
      if (this.length > this.maxBytes) {
        callback(new PacketTooLargeError(this.length, this.maxBytes));
        return;
      }
      if ((byte & 0x80) === 0 || this.headerBytes === 5) {
        const total = this.headerBytes + this.length;
        if (total > this.maxBytes) {
          callback(new PacketTooLargeError(total, this.maxBytes));
          return;
        }
        this.headerBytes = 0;
        this.bodyLeft = this.length === 0 ? -1 : this.length;
      }
    }
    callback(null, chunk);
  }
}

/**
 * The connection aedes sees: reads pass through the size check, writes go straight to the
 * socket. An oversized packet destroys the socket (MQTT 3.1.1 has no reason code for it).
 */
export function guardPacketSize(
  socket: Duplex,
  maxBytes: number,
  onTooLarge: (error: PacketTooLargeError) => void,
): Duplex {
  const check = new PacketSizeCheck(maxBytes);
  check.on('error', (error) => {
    if (error instanceof PacketTooLargeError) onTooLarge(error);
    socket.destroy();
  });
  socket.on('close', () => check.destroy());
  const readable = socket.pipe(check);
  const connection = Duplex.from({ readable, writable: socket });
  // When aedes closes the connection, the socket must go too (not only the wrapper).
  connection.on('close', () => socket.destroy());
  connection.on('error', () => socket.destroy());
  return connection;
}
