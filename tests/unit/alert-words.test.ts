// What an alert's push and e-mail say (lib/domain/alert-words.ts): the message in the farm's words,
// and for heat and ammonia the closed-room caution, which no other kind carries.
import { describe, expect, it } from "vitest";
import { ALERT_KINDS } from "@/lib/domain/vocabulary";
import { AMMONIA_CHART_CAUTION, alertMailText, alertPushBody, cautionFor } from "@/lib/domain/alert-words";

const message = "Long Bed North, fresh zone: 86.4 °F and rising 3.6 °F/h since the 26.5 lb feeding at 06:00.";

describe("alert push and e-mail bodies", () => {
  it("a heat or an ammonia push says the message, then to air a closed room and not to rely on the alert", () => {
    for (const kind of ["heat", "ammonia"] as const) {
      const body = alertPushBody(kind, message);
      expect(body.startsWith(message)).toBe(true);
      expect(body).toMatch(/air the room before you work there\. Do not rely on this alert for anyone's safety\.$/);
    }
  });

  it("other kinds carry no caution: the push body is the message alone", () => {
    for (const kind of ALERT_KINDS.filter((k) => k !== "heat" && k !== "ammonia")) {
      expect(cautionFor(kind)).toBeNull();
      expect(alertPushBody(kind, message)).toBe(message);
    }
  });

  it("the e-mail puts the caution between the message and the link to claim it", () => {
    expect(alertMailText("ammonia", message, "https://app.test/farms/f#alert-a").split("\n\n")).toEqual([
      message,
      cautionFor("ammonia"),
      "Open Wormward to claim it: https://app.test/farms/f#alert-a",
    ]);
    expect(alertMailText("drying", message, "https://app.test/x").split("\n\n")).toEqual([message, "Open Wormward to claim it: https://app.test/x"]);
  });

  it("the ammonia chart's caption says the same about a closed room, of the chart rather than an alert", () => {
    expect(AMMONIA_CHART_CAUTION).toBe(cautionFor("ammonia")!.replace("this alert", "this chart"));
  });
});
