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

const str = (s: string) => {
  const b = Buffer.from(s, "utf8");
  return Buffer.concat([Buffer.from([b.length >> 8, b.length & 0xff]), b]);
};

/** A CONNECT (MQTT 3.1.1 §3.1) with clean session, user name and password. */
export function connectPacket(clientId: string, username: string, password: string): Buffer {
  const variable = Buffer.concat([str("MQTT"), Buffer.from([4, 0xc2, 0, 60])]);
  const body = Buffer.concat([variable, str(clientId), str(username), str(password)]);
  return Buffer.concat([Buffer.from([0x10]), varint(body.length), body]);
}
