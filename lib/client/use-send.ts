import { useCallback, useState } from "react";
import { failureOf } from "@/lib/client/fetcher";
import { sendOrKeep, type Draft } from "@/lib/client/offline-queue";

export { SAVED_ON_PHONE, sendOrKeep } from "@/lib/client/offline-queue";

export type Sent<T> = { ok: true; value: T } | { ok: false; message: string; field?: string };
/** A log entry's fate: stored (with the server's answer), kept on the phone for later, or refused. */
export type Logged<T> = { ok: true; kept: false; value: T } | { ok: true; kept: true } | { ok: false; message: string; field?: string };

/** A form that writes through send(): busy while the request runs, and a refusal's sentence kept
 * under the field it names (or "form"), then handed back so the form can say more. `log` is the
 * same for a logbook entry, which with no signal is kept on the phone and sent later. */
export function useSend() {
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const attempt = useCallback(async <R>(request: () => Promise<R>): Promise<R | { ok: false; message: string; field?: string }> => {
    setBusy(true);
    setErrors({});
    try {
      return await request();
    } catch (err) {
      const failure = failureOf(err);
      setErrors({ [failure.field ?? "form"]: failure.message });
      return { ok: false, ...failure };
    } finally {
      setBusy(false);
    }
  }, []);
  const run = useCallback(<T>(request: () => Promise<T>): Promise<Sent<T>> => attempt(async () => ({ ok: true as const, value: await request() })), [attempt]);
  const log = useCallback(
    <T>(draft: Draft): Promise<Logged<T>> =>
      attempt(async () => {
        const out = await sendOrKeep<T>(draft);
        return out.kept ? ({ ok: true, kept: true } as const) : ({ ok: true, kept: false, value: out.value } as const);
      }),
    [attempt],
  );
  return { busy, errors, setErrors, run, log };
}
