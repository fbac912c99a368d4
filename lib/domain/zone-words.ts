// One rule for a zone's kind: capitalised where it stands alone or starts a line ("Fresh zone", a
// heading, a list row), lower case after its bin's name ("Long Bed North, fresh zone"). A zone's
// own name is kept as its keeper typed it.

/** What a zone is called on its own: its own name, or its kind ("Fresh zone"). */
export const zoneName = (z: { kind: string; name: string | null | undefined }) => z.name?.trim() || `${z.kind[0]!.toUpperCase()}${z.kind.slice(1)} zone`;

/** A zone after its bin's name, in running text or a choice: "Long Bed North, fresh zone". */
export const zoneInBin = (binName: string, z: { kind: string; name: string | null | undefined }, between = ", ") =>
  `${binName}${between}${z.name?.trim() || `${z.kind} zone`}`;
