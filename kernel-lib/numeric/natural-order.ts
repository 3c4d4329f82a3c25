/**
 * The natural order of level labels, used wherever levels are listed or drawn: numbers by value
 * ("2" before "10", years in time order), labels of one stem and a number by the number
 * ("plot2" before "plot10"), anything else in the order given (first appearance in the data, or
 * the pilot's order). Kept here, at the bottom of the rooms, because the data, design and plot
 * modules all need the same order and plots may import only this room's values.
 */
export function naturalOrder(labels: readonly string[]): string[] {
  const distinct = [...new Set(labels)];
  const numbers = distinct.map((l) => (l.trim() === '' ? NaN : Number(l)));
  if (numbers.every((v) => Number.isFinite(v))) {
    return distinct.map((l, i) => ({ l, v: numbers[i] })).sort((a, b) => a.v - b.v).map((x) => x.l);
  }
  const stem = /^(.*?)(\d+)$/;
  const parts = distinct.map((l) => stem.exec(l));
  if (parts.every((m) => m !== null) && parts.every((m) => m![1] === parts[0]![1])) {
    return distinct.map((l, i) => ({ l, v: Number(parts[i]![2]) })).sort((a, b) => a.v - b.v).map((x) => x.l);
  }
  return distinct;
}
