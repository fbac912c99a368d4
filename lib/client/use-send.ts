import { useCallback, useState } from "react";
import { failureOf } from "@/lib/client/fetcher";

export type Sent<T> = { ok: true; value: T } | { ok: false; message: string; field?: string };

/** A form that writes through send(): busy while the request runs, and a refusal's sentence kept
 * under the field it names (or "form"), then handed back so the form can say more. */
export function useSend() {
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const run = useCallback(async <T>(request: () => Promise<T>): Promise<Sent<T>> => {
    setBusy(true);
    setErrors({});
    try {
      return { ok: true, value: await request() };
    } catch (err) {
      const failure = failureOf(err);
      setErrors({ [failure.field ?? "form"]: failure.message });
      return { ok: false, ...failure };
    } finally {
      setBusy(false);
    }
  }, []);
  return { busy, errors, setErrors, run };
}
