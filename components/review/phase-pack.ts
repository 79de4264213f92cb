import type { PhaseData, PhasePoint } from "./phase-figure";

/**
 * The phase data in columns, for the sample page's HTML: a 5,000-spectrum sample's points as
 * objects repeat every key in every point (about 310 bytes a point); as one array per key, with
 * repeated strings (regions, sources) given once, it is about a third of that, and the browser has
 * that much less to read before it can draw. `unpackPhase(packPhase(d))` equals `d`.
 */
export interface PackedPhase extends Omit<PhaseData, "points"> {
  columns: { [K in keyof PhasePoint]: Column<PhasePoint[K]> };
}

/** Plain values, or a dictionary of the distinct values with each point's index into it. */
type Column<T> = { values: T[] } | { dict: T[]; index: number[] };

/** A column is given as a dictionary when it has few distinct values (regions, sources, flags). */
const DICT_UP_TO = 64;

/** Objects and arrays (quality flags) are the same value when their JSON is: most points share `[]`. */
const keyOf = (v: unknown) => (typeof v === "object" && v !== null ? JSON.stringify(v) : v);

function column<T>(values: T[]): Column<T> {
  const dict: T[] = [];
  const at = new Map<unknown, number>();
  const index: number[] = [];
  for (const v of values) {
    const k = keyOf(v);
    let i = at.get(k);
    if (i === undefined) {
      if (dict.length === DICT_UP_TO) return { values };
      i = dict.push(v) - 1;
      at.set(k, i);
    }
    index.push(i);
  }
  return { dict, index };
}

const valueAt = <T>(c: Column<T>, i: number): T => ("values" in c ? c.values[i] : c.dict[c.index[i]]);

export function packPhase({ points, ...rest }: PhaseData): PackedPhase {
  const keys = Object.keys(points[0] ?? {}) as (keyof PhasePoint)[];
  const columns = Object.fromEntries(keys.map((k) => [k, column(points.map((p) => p[k]))])) as PackedPhase["columns"];
  return { ...rest, columns };
}

export function unpackPhase({ columns, ...rest }: PackedPhase): PhaseData {
  const keys = Object.keys(columns) as (keyof PhasePoint)[];
  const first = columns[keys[0]] as Column<unknown> | undefined;
  const n = first ? ("values" in first ? first.values.length : first.index.length) : 0;
  const points: PhasePoint[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const p: Record<string, unknown> = {};
    for (const k of keys) p[k] = valueAt(columns[k] as Column<unknown>, i);
    points[i] = p as unknown as PhasePoint;
  }
  return { ...rest, points };
}
