/**
 * A size as people read it, in SI units ("999 B", "12.3 kB", "4.0 MB"): BagIt's Bag-Size and the
 * bundle lists use the same words.
 * @param bytes octets
 * @returns the size with one decimal above 1,000 bytes
 */
export function humanSize(bytes: number): string {
  const units = ["B", "kB", "MB", "GB", "TB"];
  let v = bytes;
  let i = 0;
  while (v >= 1000 && i < units.length - 1) {
    v /= 1000;
    i += 1;
  }
  return i === 0 ? `${bytes} B` : `${v.toFixed(1)} ${units[i]}`;
}
