/** What a zone is called on a screen or in a message: its own name, or its kind ("Fresh zone"). */
export const zoneName = (z: { kind: string; name: string | null }) => z.name?.trim() || `${z.kind[0]!.toUpperCase()}${z.kind.slice(1)} zone`;
