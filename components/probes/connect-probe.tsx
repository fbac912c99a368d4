"use client";

import { useEffect, useRef, useState } from "react";
import Link from "next/link";
import { probeSnippets, type PublicAddresses } from "@/lib/domain/probe-snippets";
import { LOCAL_CODES } from "@/lib/domain/safety-words";
import { probeTopics } from "@/lib/domain/vocabulary";

/** A copy button: the clipboard where the browser allows it, else the text is selected for the phone's own copy. */
function CopyButton({ label, text, target }: { label: string; text: string; target: React.RefObject<HTMLElement | null> }) {
  const [said, setSaid] = useState("");
  async function copy() {
    try {
      // The clipboard API exists only in a secure context (https or this machine's own address).
      if (!navigator.clipboard) throw new Error("no clipboard");
      await navigator.clipboard.writeText(text);
      setSaid("Copied");
    } catch {
      const el = target.current;
      const sel = window.getSelection();
      if (el && sel) {
        sel.selectAllChildren(el);
        setSaid("Selected: use your phone's Copy");
      } else {
        setSaid("Select the text and copy it");
      }
    }
  }
  return (
    <span className="flex items-center gap-2">
      <span aria-live="polite" className="text-xs text-soil-700">
        {said}
      </span>
      <button type="button" onClick={copy} className="min-h-11 shrink-0 rounded-lg bg-soil-800 px-3 text-sm font-bold text-white">
        {label}
      </button>
    </span>
  );
}

function Snippet({ id, title, text }: { id: string; title: string; text: string }) {
  const pre = useRef<HTMLPreElement>(null);
  return (
    <div data-snippet={id}>
      <div className="flex items-center justify-between gap-2">
        <h3 className="text-sm font-bold">{title}</h3>
        <CopyButton label={`Copy ${title}`} text={text} target={pre} />
      </div>
      {/* Focusable, so the text that scrolls inside it can be read from the keyboard too. */}
      <pre
        ref={pre}
        tabIndex={0}
        role="region"
        aria-label={`${title} text`}
        className="mt-1 max-h-20 overflow-auto rounded bg-white p-2 text-xs break-all whitespace-pre-wrap ring-1 ring-soil-300"
      >
        {text}
      </pre>
    </div>
  );
}

/**
 * A probe's one-time token and how to connect it, shown where the owner tapped: the box scrolls
 * itself into view and takes the focus when it appears.
 */
export function ConnectProbe({
  code,
  token,
  reportIntervalS,
  addresses,
  probeHref,
  onDone,
}: {
  code: string;
  token: string;
  reportIntervalS: number;
  addresses: PublicAddresses;
  probeHref: string | null;
  onDone: () => void;
}) {
  const box = useRef<HTMLDivElement>(null);
  const heading = useRef<HTMLHeadingElement>(null);
  const tokenRef = useRef<HTMLElement>(null);
  useEffect(() => {
    box.current?.scrollIntoView({ block: "start" });
    heading.current?.focus({ preventScroll: true });
  }, [token]);
  const s = probeSnippets(addresses, { code, token }, reportIntervalS);
  const { host, port, tls } = addresses.mqtt;
  return (
    <div ref={box} role="status" data-connect-probe={code} className="scroll-mt-16 space-y-3 rounded-xl bg-straw-100 p-3 ring-2 ring-straw-600">
      <h2 ref={heading} tabIndex={-1} className="font-bold outline-none">
        Token for {code}: copy it now, it is shown only once.
      </h2>
      <div className="flex items-center gap-2">
        <code ref={tokenRef} data-token className="block min-w-0 flex-1 rounded bg-white p-2 text-sm break-all">
          {token}
        </code>
        <CopyButton label="Copy token" text={token} target={tokenRef} />
      </div>
      <p className="text-sm">
        Broker <b className="break-all">{`${tls ? "mqtts" : "mqtt"}://${host}:${port}`}</b>, user name <b>{code}</b>, password the token; readings go to{" "}
        <code className="break-all">{probeTopics(code).readings}</code>.
      </p>
      {addresses.loopback && (
        <p className="text-sm text-clay-700">
          This address is this computer&rsquo;s own: a probe on another machine cannot reach it. Ask whoever runs Wormward to set PUBLIC_MQTT_URL and
          PUBLIC_INGEST_URL to the server&rsquo;s network address.
        </p>
      )}
      <Snippet id="mosquitto-pub" title="mosquitto_pub" text={s.mosquittoPub} />
      <Snippet id="curl" title="curl" text={s.curl} />
      <Snippet id="micropython" title="MicroPython" text={s.micropython} />
      <div className="space-y-1 text-sm">
        <p>
          The MicroPython program is for an ESP32-class Wi-Fi board with a DS18B20 on GPIO 4 (with a 4.7 kΩ pull-up to 3.3 V, as its data sheet shows) and a
          capacitive moisture sensor on GPIO 34, powered from 3.3 V so its output stays within the board&rsquo;s input range (from memory). Put in your Wi-Fi
          name and password.
        </p>
        <p className="font-bold">
          Power the board from a low-voltage supply with ground-fault protection, as your local electrical code requires. Keep mains wiring and plugs out of the
          bin and away from damp bedding and leachate. {LOCAL_CODES}
        </p>
      </div>
      <div className="flex flex-wrap items-center gap-3">
        {probeHref && (
          <Link href={probeHref} className="inline-flex min-h-11 items-center text-soil-800 underline underline-offset-4">
            Watch for its first reading
          </Link>
        )}
        <button type="button" onClick={onDone} className="min-h-11 rounded-lg bg-soil-800 px-4 font-bold text-white">
          I have copied it
        </button>
      </div>
    </div>
  );
}
