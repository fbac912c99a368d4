// Remaining Length as MQTT 3.1.1 §2.2.3 encodes it, written here apart from ingest/frame-guard.ts so
// the tests check the guard against an encoding of their own.
export function varint(n: number): Buffer {
  const out: number[] = [];
  do {
    let b = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) b |= 0x80;
    out.push(b);
  } while (n > 0);
  return Buffer.from(out);
}
