// The broker alone, for the ingest bench's ceiling: aedes with its defaults (in-memory persistence,
// every client allowed, no database), in its own process like ingest/main.ts. It acknowledges a
// QoS 1 publish as soon as aedes has it. Prints "broker-only: MQTT on <port>" when listening.
import net from "node:net";
import { Aedes } from "aedes";

const broker = await Aedes.createBroker();
const server = net.createServer((socket) => broker.handle(socket));
server.listen(Number(process.env.MQTT_PORT ?? 0), "127.0.0.1", () => {
  console.log(`broker-only: MQTT on ${(server.address() as net.AddressInfo).port}`);
});
const stop = () => broker.close(() => server.close(() => process.exit(0)));
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
