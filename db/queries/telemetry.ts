import { db } from "@/db";
import { updateProbeStatus, type ProbeStatusUpdate } from "./probes";
import { insertReadings, recordRejections, type ReadingInput, type RejectionInput } from "./readings";

/**
 * One message's readings, rejections and probe status in one transaction, as the MQTT writer
 * stores a batch: either all of it is committed or none, so a client told 202 lost nothing.
 */
export async function storeMessage(msg: {
  readings: readonly ReadingInput[];
  rejections: readonly RejectionInput[];
  status: ProbeStatusUpdate | null;
}): Promise<{ inserted: number }> {
  return db().transaction(async (tx) => {
    const { inserted } = await insertReadings(msg.readings, tx);
    await recordRejections(msg.rejections, tx);
    if (msg.status) await updateProbeStatus([msg.status], tx);
    return { inserted };
  });
}
