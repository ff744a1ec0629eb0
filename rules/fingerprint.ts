// Stable finding fingerprints: the same problem in the same cell keeps its
// fingerprint when lines move or unrelated parts of the netlist change.

/** cyrb53: a fast 53-bit string hash (public domain, bryc). */
export function hash53(text: string, seed = 0): number {
  let h1 = 0xdeadbeef ^ seed;
  let h2 = 0x41c6ce57 ^ seed;
  for (let i = 0; i < text.length; i++) {
    const ch = text.charCodeAt(i);
    h1 = Math.imul(h1 ^ ch, 2654435761);
    h2 = Math.imul(h2 ^ ch, 1597334677);
  }
  h1 = Math.imul(h1 ^ (h1 >>> 16), 2246822507);
  h1 ^= Math.imul(h2 ^ (h2 >>> 13), 3266489909);
  h2 = Math.imul(h2 ^ (h2 >>> 16), 2246822507);
  h2 ^= Math.imul(h1 ^ (h1 >>> 13), 3266489909);
  return 4294967296 * (2097151 & h2) + (h1 >>> 0);
}

export function fingerprint(ruleId: string, cell: string, devices: readonly string[], nets: readonly string[]): string {
  const norm = (xs: readonly string[]) => [...new Set(xs.map((x) => x.toLowerCase()))].sort().join(',');
  const text = `${ruleId}|${cell.toLowerCase()}|${norm(devices)}|${norm(nets)}`;
  return hash53(text).toString(16).padStart(14, '0');
}
