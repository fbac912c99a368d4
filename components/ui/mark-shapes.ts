// Wormward's one registry of marks: every meaning a screen marks has its own shape here, drawn on a
// 12 × 12 grid, and no shape stands for two meanings (tests/unit/marks.test.ts). A mark always goes
// with its word; colour comes from the text colour around it (currentColor), so the same shape
// serves the light and the dark theme. Our own drawings, from the trade: a flame for heat, frost for
// cold, fumes for ammonia, a balance for the mix check, a worm curled tight for act now.
//
// `stroke` marks are drawn as lines of that width; the others are filled (even-odd, so a path may
// cut a hole in itself).

export type MarkShape = { d: string; stroke?: number; means: string };

export const MARKS = {
  // --- how a reading sits against the species' band (and the ammonia lines) ---
  /** A dot held between two lines: inside the band. */
  comfortable: { d: "M1 1h10v1.5H1ZM1 9.5h10V11H1ZM6 3.5a2.5 2.5 0 1 1 0 5 2.5 2.5 0 0 1 0-5Z", means: "comfortable: inside the species' band" },
  /** A flame. */
  heat: { d: "M6 .5c.6 2.2 4.5 3.9 4.5 7a4.5 4.5 0 0 1-9 0c0-1.8 1-3 2-3.8 0 1.4.6 2.4 1.6 2.8C4.6 4.4 5.2 2.4 6 .5Z", means: "warm or too hot" },
  /** Frost: a six-armed crystal. */
  cold: { d: "M6 1v10M1.7 3.5l8.6 5M1.7 8.5l8.6-5", stroke: 1.6, means: "cool or too cold" },
  /** A dry clod: a diamond. */
  dry: { d: "M6 .5 11.5 6 6 11.5.5 6Z", means: "dry or too dry" },
  /** A drop. */
  wet: { d: "M6 .5C8 4 10.5 6 10.5 8a4.5 4.5 0 0 1-9 0C1.5 6 4 4 6 .5Z", means: "wet or too wet" },
  /** Three fumes rising. */
  ammonia: {
    d: "M2.5 11.5c-1.2-1.6 1.2-2.4 0-4s1.2-2.4 0-4.5M6 11.5c-1.2-1.6 1.2-2.4 0-4s1.2-2.4 0-4.5M9.5 11.5c-1.2-1.6 1.2-2.4 0-4s1.2-2.4 0-4.5",
    stroke: 1.4,
    means: "ammonia over a line",
  },
  /** A short bar: nothing to show. */
  noReading: { d: "M1 5h10v2H1Z", means: "no reading" },

  // --- the mix check: a balance ---
  /** The beam level on its fulcrum. */
  mixBalanced: { d: "M.5 4h11v1.5H.5ZM6 6.2 9 11H3Z", means: "a balanced mix" },
  /** The beam tipped to the left under a round weight: too much nitrogen (greens). */
  mixNitrogen: { d: "M.8 6.9 11.2 2.3l.6 1.4L1.4 8.3ZM2.4 2a1.6 1.6 0 1 1 0 3.2 1.6 1.6 0 0 1 0-3.2ZM6 6.6 9 11H3Z", means: "a mix too rich in nitrogen" },
  /** The beam tipped to the right under a square block: too much carbon (browns). */
  mixCarbon: { d: "M.2 3.7.8 2.3l10.4 4.6-.6 1.4ZM8.4 1.8h3v3h-3ZM6 6.6 9 11H3Z", means: "a mix too rich in carbon" },

  // --- the logbook: what was done to a bed ---
  /** A heap of chopped scraps. */
  feeding: {
    d: "M.5 8.8h3.4v2.7H.5ZM4.3 8.8h3.4v2.7H4.3ZM8.1 8.8h3.4v2.7H8.1ZM2.4 5.7h3.4v2.7H2.4ZM6.2 5.7h3.4v2.7H6.2ZM4.3 2.6h3.4v2.7H4.3Z",
    means: "a feeding",
  },
  /** Three drops falling onto the bed. */
  watering: {
    d: "M1 9.5h10V11H1ZM2.6 0.8c.7 1.1 1.2 1.8 1.2 2.5a1.2 1.2 0 0 1-2.4 0c0-.7.5-1.4 1.2-2.5ZM6 3c.7 1.1 1.2 1.8 1.2 2.5a1.2 1.2 0 0 1-2.4 0c0-.7.5-1.4 1.2-2.5ZM9.4 0.8c.7 1.1 1.2 1.8 1.2 2.5a1.2 1.2 0 0 1-2.4 0c0-.7.5-1.4 1.2-2.5Z",
    means: "a watering",
  },
  /** A bucket with its handle. */
  harvest: { d: "M1.5 4h9l-1.4 7.5H2.9ZM3 3.5a3 3 0 0 1 6 0H7.7a1.7 1.7 0 0 0-3.4 0Z", means: "a harvest of castings" },
  /** An arrow over the bed: material pushed toward the harvest side. */
  shift: { d: "M1 9.5h10V11H1ZM1 4h6.5V2l3.5 3-3.5 3V6H1Z", means: "a shift toward the harvest side" },
  /** Lines of writing. */
  note: { d: "M1 2h10v2H1zM1 5h10v2H1zM1 8h7v2H1z", means: "a note" },
  /** A drying dish under its lid. */
  ovenSample: { d: "M1 5.5h10a5 5 0 0 1-10 0ZM3 2.5h6V4H3Z", means: "an oven-dry sample" },

  // --- alerts: level, state and the caution ---
  /** A worm curled tight. */
  actNow: { d: "M7.875 6.75a1.5 1.5 0 0 0-3 0a3 3 0 0 0 6 0a4.5 4.5 0 0 0-9 0v2.5", stroke: 1.5, means: "act now" },
  /** A ring filling from below. */
  headsUp: {
    d: "M6 1a5 5 0 1 1 0 10A5 5 0 0 1 6 1Zm0 1.6a3.4 3.4 0 1 0 0 6.8 3.4 3.4 0 0 0 0-6.8ZM2.6 6h6.8a3.4 3.4 0 0 1-6.8 0Z",
    means: "heads-up",
  },
  /** An empty ring: raised, nobody on it yet. */
  raised: { d: "M6 1.5a4.5 4.5 0 1 1 0 9 4.5 4.5 0 0 1 0-9Z", stroke: 1.5, means: "raised, nobody on it yet" },
  /** A person: someone said "I'm on it". */
  claimed: { d: "M6 1a2.5 2.5 0 1 1 0 5 2.5 2.5 0 0 1 0-5ZM1.5 11.5C1.5 8.6 3.4 7 6 7s4.5 1.6 4.5 4.5Z", means: "claimed" },
  /** A tick: finished (an alert settled, a log saved). */
  done: { d: "M1.5 6.5 4.5 9.5 10.5 2.5", stroke: 2, means: "done: settled or saved" },
  /** An open window: air the room. */
  caution: { d: "M1.5 1.5h9v9h-9ZM6 1.5v9M1.5 6h9", stroke: 1.4, means: "a caution for people" },
  /** A cross: refused, fix this. */
  error: { d: "M2 2 10 10M10 2 2 10", stroke: 2.2, means: "an error or refusal" },

  // --- choices and people ---
  /** A dot: the chosen option. */
  chosen: { d: "M6 3a3 3 0 1 1 0 6 3 3 0 0 1 0-6Z", means: "the chosen option" },
  owner: { d: "M1 10 2 3l2.5 3L6 1l1.5 5L10 3l1 7Z", means: "owner" },
  keeper: { d: "M6 11.5C2 9 1 6 1.5 2 4 2 6 3.5 6 6c0-2.5 2-4 4.5-4 .5 4-.5 7-4.5 9.5Z", means: "keeper" },
  viewer: { d: "M6 3C3 3 1 6 1 6s2 3 5 3 5-3 5-3-2-3-5-3Zm0 1.5a1.5 1.5 0 1 1 0 3 1.5 1.5 0 0 1 0-3Z", means: "viewer" },

  // --- probes (for the probe list's presence words) ---
  /** A worm's wriggle: the probe is reporting. */
  reporting: { d: "M1 6c1.25-2.5 2.5-2.5 3.33 0s2.08 2.5 3.33 0 2.09-2.5 3.34 0", stroke: 1.6, means: "a probe reporting" },
  /** A wriggle that runs flat: the probe went silent. */
  silent: { d: "M1 6c1-2.5 2-2.5 2.7 0s1.7 2.5 2.6 0H11", stroke: 1.6, means: "a probe gone silent" },
  /** Three short dashes: a probe that has not sent its first reading. */
  waiting: { d: "M1.5 6h1.5M5.25 6h1.5M9 6h1.5", stroke: 1.6, means: "a probe with no reading yet" },
  /** A box with its lid on: a probe put away, its readings kept. */
  archived: { d: "M1.5 2.5h9v2.5h-9ZM2.5 5v4.5h7V5M4.5 7h3", stroke: 1.3, means: "a probe archived" },

  // --- no signal: the phone keeps pages and entries ---
  /** Signal bars struck through: no signal, values from the copy on the phone. */
  offline: { d: "M1 9h2v2.5H1ZM4.5 6.5h2v5h-2ZM8 4h2v7.5H8ZM.6 1.7l1.1-1.1 9.7 9.7-1.1 1.1Z", means: "offline: values kept on the phone" },
  /** An arrow up from a tray: an entry kept on the phone, to be sent. */
  toSend: { d: "M6 .8l3.5 3.7H7v4H5v-4H2.5ZM1 9.5h10V11H1Z", means: "an entry waiting to be sent" },
} as const satisfies Record<string, MarkShape>;

export type MarkName = keyof typeof MARKS;
