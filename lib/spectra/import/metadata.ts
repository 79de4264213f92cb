/**
 * Metadata keys → canonical SpectrumMeta. Accepts the canonical keys themselves (`setpoint_current_A`),
 * spelled-out names with units in the key or the value (`setpoint current (pA): 50`,
 * `Setpoint current: 50 pA`, `lock-in modulation [mV pp]: 5.6`), and keeps everything else in `extra`.
 */
import type { SpectrumMeta } from "./types";
import { parseValueWithUnit, splitNameUnit, toKelvin, unitFactor } from "./units";

type Canon = Exclude<keyof SpectrumMeta, "extra">;

interface KeyRule {
  key: Canon;
  test: RegExp;
  /** Unit implied when none is given. */
  defaultUnit: string;
}

const RULES: KeyRule[] = [
  { key: "setpoint_bias_V", test: /^(setpoint[ _-]?bias|bias[ _-]?setpoint|v[ _-]?set(point)?|set[ _-]?point[ _-]?(bias|voltage))(_v)?$/, defaultUnit: "V" },
  { key: "setpoint_current_A", test: /^(setpoint[ _-]?current|current[ _-]?setpoint|i[ _-]?set(point)?|set[ _-]?point[ _-]?current)(_a)?$/, defaultUnit: "A" },
  { key: "z_offset_pm", test: /^(z[ _-]?offset|dz|delta[ _-]?z|z[ _-]?shift)(_pm)?$/, defaultUnit: "pm" },
  { key: "lockin_modulation_mV_rms", test: /^(lock[ _-]?in([ _-]?(modulation|amplitude))?|modulation([ _-]?amplitude)?|v[ _-]?mod(ulation)?|bias[ _-]?modulation)(_mv_rms|_mv)?$/, defaultUnit: "mV" },
  { key: "temperature_K", test: /^(temperature|temp|t)(_k)?$/, defaultUnit: "K" },
  { key: "x_nm", test: /^(x|x[ _-]?pos(ition)?|pos(ition)?[ _-]?x)(_nm)?$/, defaultUnit: "nm" },
  { key: "y_nm", test: /^(y|y[ _-]?pos(ition)?|pos(ition)?[ _-]?y)(_nm)?$/, defaultUnit: "nm" },
  { key: "region", test: /^(region|layer|area|region[ _-]?label)$/, defaultUnit: "" },
];

export function emptyMeta(): SpectrumMeta {
  return { extra: {} };
}

/**
 * Apply one `key: value` pair to meta. Returns a warning when the key is recognised but the value or
 * unit is not, in which case the pair is kept in `extra`.
 */
export function applyMetaPair(meta: SpectrumMeta, rawKey: string, rawValue: string): string | null {
  const { name, unit: keyUnit } = splitNameUnit(rawKey);
  const k = name.toLowerCase().replace(/\s+/g, " ").trim();
  const value = rawValue.trim();
  const rule = RULES.find((r) => r.test.test(k));
  if (!rule) {
    meta.extra[rawKey.trim()] = value;
    return null;
  }
  if (rule.key === "region") {
    meta.region = value;
    return null;
  }
  const pv = parseValueWithUnit(value);
  if (!pv) {
    meta.extra[rawKey.trim()] = value;
    return `metadata "${rawKey.trim()}": "${value}" is not a number; kept as text`;
  }
  // A unit in the key wins; otherwise a unit after the value; otherwise the rule's implied unit
  // (canonical keys carry it in their suffix).
  let unit = keyUnit || pv.unit || rule.defaultUnit;
  const lower = unit.toLowerCase();
  let v = pv.value;
  switch (rule.key) {
    case "setpoint_bias_V": {
      const f = unitFactor("voltage", unit);
      if (f === null) break;
      meta.setpoint_bias_V = v * f;
      return null;
    }
    case "setpoint_current_A": {
      const f = unitFactor("current", unit);
      if (f === null) break;
      meta.setpoint_current_A = v * f;
      return null;
    }
    case "z_offset_pm": {
      const f = unitFactor("length", unit);
      if (f === null) break;
      meta.z_offset_pm = v * f * 1000;
      return null;
    }
    case "lockin_modulation_mV_rms": {
      const f = unitFactor("voltage", unit);
      if (f === null) break;
      v = v * f * 1000;
      const qual = `${k} ${lower}`;
      if (/(pp|p-p|peak[ -]?to[ -]?peak)/.test(qual)) v = v / (2 * Math.SQRT2);
      else if (/(\bpeak\b|\bpk\b|zero[ -]?to[ -]?peak)/.test(qual) && !/rms/.test(qual)) v = v / Math.SQRT2;
      meta.lockin_modulation_mV_rms = v;
      return null;
    }
    case "temperature_K": {
      const t = toKelvin(v, unit);
      if (t === null) break;
      meta.temperature_K = t;
      return null;
    }
    case "x_nm":
    case "y_nm": {
      const f = unitFactor("length", unit);
      if (f === null) break;
      meta[rule.key] = v * f;
      return null;
    }
  }
  unit = unit || "(none)";
  meta.extra[rawKey.trim()] = value;
  return `metadata "${rawKey.trim()}": unknown unit "${unit}"; kept as text`;
}

/** Parse a metadata line body ("key: value" or "key = value"); null if it is neither. */
export function splitMetaLine(body: string): [string, string] | null {
  const m = /^\s*([^:=]+?)\s*[:=]\s*(.*)$/.exec(body);
  if (!m || m[1] === "") return null;
  return [m[1], m[2]];
}
