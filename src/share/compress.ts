/**
 * deflate-raw through the platform's CompressionStream / DecompressionStream
 * (global in browsers and Node 20; no dependency). Inflation is bounded: the
 * compressed bytes are fed in small slices while the output is counted, and
 * both sides stop as soon as the output passes the cap, so a "zip bomb" costs
 * at most the cap plus a few slices' worth of output, never its full size.
 * (Node's zlib-backed stream also stops inflating while its output is unread;
 * slicing keeps the bound on hosts that inflate a whole written chunk at once.)
 */

/** Input fed to the decompressor per write. deflate expands at most ~1032:1, so one slice yields <= ~264 KB. */
const SLICE_BYTES = 256;

async function collect(reader: ReadableStreamDefaultReader<Uint8Array>): Promise<Uint8Array> {
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    chunks.push(value);
    total += value.byteLength;
  }
  return concat(chunks, total);
}

function concat(chunks: readonly Uint8Array[], total: number): Uint8Array {
  const out = new Uint8Array(total);
  let offset = 0;
  for (const chunk of chunks) {
    out.set(chunk, offset);
    offset += chunk.byteLength;
  }
  return out;
}

export async function deflateRaw(bytes: Uint8Array): Promise<Uint8Array> {
  const stream = new CompressionStream('deflate-raw');
  const writer = stream.writable.getWriter();
  const writing = writer.write(bytes as Uint8Array<ArrayBuffer>).then(() => writer.close());
  const [out] = await Promise.all([collect(stream.readable.getReader() as ReadableStreamDefaultReader<Uint8Array>), writing]);
  return out;
}

export type InflateResult =
  | { ok: true; bytes: Uint8Array }
  | { ok: false; reason: 'damaged' }
  | { ok: false; reason: 'too-large'; produced: number };

/** Inflate deflate-raw data, giving up as soon as the output exceeds `maxBytes`. Never throws. */
export async function inflateRawBounded(bytes: Uint8Array, maxBytes: number): Promise<InflateResult> {
  let stream: DecompressionStream;
  try {
    stream = new DecompressionStream('deflate-raw');
  } catch {
    return { ok: false, reason: 'damaged' };
  }
  const writer = stream.writable.getWriter();
  const reader = stream.readable.getReader() as ReadableStreamDefaultReader<Uint8Array>;
  let stop = false;
  // Errors on the writing side surface on the reading side too; swallow them here.
  void (async () => {
    for (let offset = 0; offset < bytes.length; offset += SLICE_BYTES) {
      await writer.ready;
      if (stop) return;
      await writer.write(bytes.subarray(offset, offset + SLICE_BYTES) as Uint8Array<ArrayBuffer>);
      if (stop) return;
    }
    await writer.close();
  })().catch(() => undefined);

  const chunks: Uint8Array[] = [];
  let total = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      total += value.byteLength;
      if (total > maxBytes) {
        stop = true;
        reader.cancel().catch(() => undefined);
        writer.abort().catch(() => undefined);
        return { ok: false, reason: 'too-large', produced: total };
      }
      chunks.push(value);
    }
  } catch {
    stop = true;
    writer.abort().catch(() => undefined);
    return { ok: false, reason: 'damaged' };
  }
  return { ok: true, bytes: concat(chunks, total) };
}
