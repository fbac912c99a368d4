import { afterEach, describe, expect, it, vi } from "vitest";
import { failureOf, FetchError, fetcher, NO_CONNECTION, NO_CONNECTION_READ, plainSentence, send } from "@/lib/client/fetcher";

// The one client write path: what goes out, and how a refusal or a lost connection comes back.
const answer = (status: number, body: unknown) => new Response(body === undefined ? null : JSON.stringify(body), { status });

function stubFetch(reply: () => Promise<Response>) {
  const calls: { url: string; init: RequestInit }[] = [];
  vi.stubGlobal("fetch", (url: string, init: RequestInit) => {
    calls.push({ url, init });
    return reply();
  });
  return calls;
}

afterEach(() => vi.unstubAllGlobals());

describe("send()", () => {
  it("sends a JSON body with Content-Type application/json and returns the parsed answer", async () => {
    const calls = stubFetch(async () => answer(201, { bin: { name: "Shed" } }));
    const out = await send<{ bin: { name: string } }>("POST", "/api/farms/f1/bins", { name: "Shed" });
    expect(out.bin.name).toBe("Shed");
    expect(calls[0]!.init.method).toBe("POST");
    expect(calls[0]!.init.body).toBe('{"name":"Shed"}');
    expect(new Headers(calls[0]!.init.headers).get("content-type")).toBe("application/json");
  });

  it("sends no body and no Content-Type without a body, and a multipart form as it is", async () => {
    const calls = stubFetch(async () => answer(200, {}));
    await send("POST", "/api/alerts/a1/claim");
    expect(calls[0]!.init.body).toBeUndefined();
    expect(new Headers(calls[0]!.init.headers).has("content-type")).toBe(false);
    const form = new FormData();
    form.set("file", "time,value\n");
    await send("POST", "/api/farms/f1/imports", form);
    expect(calls[1]!.init.body).toBe(form);
    expect(new Headers(calls[1]!.init.headers).has("content-type")).toBe(false);
  });

  it("a refusal is thrown as a FetchError with the envelope's message, the status and the field", async () => {
    stubFetch(async () => answer(422, { error: { code: "invalid", message: "Name is required.", field: "name" } }));
    const err = await send("POST", "/api/farms/f1/bins", {}).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FetchError);
    expect(err).toMatchObject({ message: "Name is required.", status: 422, field: "name" });
    expect(failureOf(err)).toEqual({ message: "Name is required.", field: "name" });
  });

  it("a form gets the sentence without the field's name in front, since it shows it beside the field", async () => {
    stubFetch(async () => answer(422, { error: { code: "invalid", message: "items.0.massKg: Give the mass in kg.", field: "items.0.massKg" } }));
    await expect(send("POST", "/api/bins/b1/feedings", {})).rejects.toMatchObject({ message: "Give the mass in kg.", field: "items.0.massKg" });
    // Only the named field's own prefix goes; a sentence that merely has a colon keeps it.
    expect(plainSentence("Authorization: Bearer is missing.", undefined)).toBe("Authorization: Bearer is missing.");
    expect(plainSentence("endpoint: Not a push service.", "name")).toBe("endpoint: Not a push service.");
  });

  it("an answer without the envelope still says what happened, with its status", async () => {
    stubFetch(async () => new Response("<html>bad gateway</html>", { status: 502 }));
    await expect(send("DELETE", "/api/logbook/note/n1")).rejects.toMatchObject({ status: 502, message: "The server could not do that (502); try again." });
  });

  it("a lost connection is one FetchError with the one no-connection sentence", async () => {
    stubFetch(async () => Promise.reject(new TypeError("Failed to fetch")));
    const err = await send("PUT", "/api/bins/b1/rules", { kind: "heat" }).catch((e: unknown) => e);
    expect(err).toMatchObject({ message: NO_CONNECTION, status: 0 });
    expect(failureOf(err).message).toBe(NO_CONNECTION);
    expect(failureOf(new Error("anything else")).message).toBe(NO_CONNECTION);
  });
});

describe("fetcher()", () => {
  it("reads the same envelope as send()", async () => {
    stubFetch(async () => answer(404, { error: { code: "not_found", message: "Not found." } }));
    await expect(fetcher("/api/bins/x/feedings")).rejects.toMatchObject({ message: "Not found.", status: 404 });
    stubFetch(async () => answer(200, { feedings: [] }));
    await expect(fetcher("/api/bins/b1/feedings")).resolves.toEqual({ feedings: [] });
  });

  it("a lost connection on a read is said in the same words as on a save, not the browser's", async () => {
    stubFetch(async () => Promise.reject(new TypeError("Failed to fetch")));
    const err = await fetcher("/api/farms/f1/today").catch((e: unknown) => e);
    expect(err).toMatchObject({ message: NO_CONNECTION_READ, status: 0 });
    expect(NO_CONNECTION_READ.split(":")[0]).toBe(NO_CONNECTION.split(":")[0]);
    stubFetch(async () => new Response("<html>bad gateway</html>", { status: 502 }));
    await expect(fetcher("/api/farms/f1/today")).rejects.toMatchObject({ status: 502, message: "The server could not load this (502); try again." });
  });
});
