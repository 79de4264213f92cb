import { zipSync, strToU8 } from "fflate";
import { describe, expect, it } from "vitest";
import { DEFAULT_IMPORT_LIMITS, importSpectra, makeSpectrum } from "@/lib/spectra";

const enc = (s: string) => new TextEncoder().encode(s);

/** A 40-point spectrum as text: bias in V, dI/dV a parabola (values checked below). */
function csv(opts: { sep?: string; decimalComma?: boolean; header?: string; meta?: string[]; n?: number; scale?: number } = {}) {
  const n = opts.n ?? 40;
  const sep = opts.sep ?? ",";
  const lines = [...(opts.meta ?? [])];
  if (opts.header !== "") lines.push(opts.header ?? ["bias (V)", "dI/dV (a.u.)"].join(sep));
  for (let i = 0; i < n; i++) {
    const v = -0.2 + i * 0.01;
    let row = [(v * (opts.scale ?? 1)).toFixed(4), (1 + v * v).toFixed(6)].join(sep);
    if (opts.decimalComma) row = row.replace(/\./g, ",");
    lines.push(row);
  }
  return lines.join("\n") + "\n";
}

function one(name: string, text: string | Uint8Array, limits = {}) {
  const r = importSpectra(name, typeof text === "string" ? enc(text) : text, limits);
  expect(r).toHaveLength(1);
  return r[0];
}

describe("delimited text", () => {
  it("comma-separated with units in the header and metadata lines", () => {
    const f = one("a.csv", csv({ meta: ["# temperature_K: 4.5", "# lockin_modulation_mV_rms: 2", "# setpoint_bias_V: 0.5", "# setpoint_current_A: 1e-10", "# operator: ada"] }));
    expect(f.status).toBe("ok");
    const s = f.spectra[0];
    expect(s.bias_V).toHaveLength(40);
    expect(s.bias_V[0]).toBeCloseTo(-0.2, 12);
    expect(s.didv[0]).toBeCloseTo(1.04, 12);
    expect(s.current_A).toBeNull();
    expect(s.meta).toMatchObject({ temperature_K: 4.5, lockin_modulation_mV_rms: 2, setpoint_bias_V: 0.5, setpoint_current_A: 1e-10 });
    expect(s.meta.extra.operator).toBe("ada");
  });
  it("semicolon with decimal comma, bias in mV", () => {
    const f = one("b.csv", csv({ sep: ";", decimalComma: true, header: "Bias [mV];dI/dV (a.u.)", scale: 1000 }));
    expect(f.status).toBe("ok");
    expect(f.spectra[0].bias_V[1]).toBeCloseTo(-0.19, 12);
    expect(f.spectra[0].didv[1]).toBeCloseTo(1 + 0.19 * 0.19, 6);
  });
  it("tab-separated and whitespace-separated", () => {
    expect(one("c.tsv", csv({ sep: "\t" })).spectra[0].bias_V).toHaveLength(40);
    const w = one("d.txt", csv({ sep: "   ", header: "" }));
    expect(w.status).toBe("ok");
    expect(w.warnings.join()).toMatch(/no header/);
  });
  it("whitespace-separated with decimal commas", () => {
    const f = one("e.txt", csv({ sep: " ", decimalComma: true, header: "" }));
    expect(f.status).toBe("ok");
    expect(f.spectra[0].bias_V[2]).toBeCloseTo(-0.18, 12);
  });
  it("UTF-16 LE with BOM, UTF-16 BE with BOM, UTF-8 with BOM", () => {
    const text = csv({ meta: ["# temperature (mK): 1200"] });
    const le = new Uint8Array(2 + text.length * 2);
    le[0] = 0xff;
    le[1] = 0xfe;
    for (let i = 0; i < text.length; i++) le[2 + 2 * i] = text.charCodeAt(i);
    const be = new Uint8Array(2 + text.length * 2);
    be[0] = 0xfe;
    be[1] = 0xff;
    for (let i = 0; i < text.length; i++) be[3 + 2 * i] = text.charCodeAt(i);
    const u8 = new Uint8Array([0xef, 0xbb, 0xbf, ...enc(text)]);
    for (const bytes of [le, be, u8]) {
      const f = one("u.csv", bytes);
      expect(f.status).toBe("ok");
      expect(f.spectra[0].bias_V).toHaveLength(40);
      expect(f.spectra[0].meta.temperature_K).toBeCloseTo(1.2, 12);
    }
    // Without a BOM, UTF-16 LE is recognised from its zero bytes.
    const f = one("u.csv", le.subarray(2));
    expect(f.status).toBe("ok");
  });
  it("metadata unit variants convert to the canonical units", () => {
    const f = one("m.csv", csv({
      meta: [
        "# setpoint current (pA): 50",
        "# Setpoint bias: 500 mV",
        "# z offset [Å]: -1.5",
        "# lock-in modulation (mV pp): 5.656854",
        "# temperature: 77 K",
        "# x (pm): 1500",
        "# y_nm: 2,5",
        "# region: terrace B",
      ],
    }));
    const m = f.spectra[0].meta;
    expect(m.setpoint_current_A).toBeCloseTo(50e-12, 20);
    expect(m.setpoint_bias_V).toBeCloseTo(0.5, 12);
    expect(m.z_offset_pm).toBeCloseTo(-150, 9);
    expect(m.lockin_modulation_mV_rms).toBeCloseTo(2, 5); // peak-to-peak = 2√2 × rms
    expect(m.temperature_K).toBe(77);
    expect(m.x_nm).toBeCloseTo(1.5, 12);
    expect(m.y_nm).toBeCloseTo(2.5, 12);
    expect(m.region).toBe("terrace B");
  });
  it("an unknown unit on a known key is kept as text with a warning", () => {
    const f = one("m.csv", csv({ meta: ["# setpoint current (furlongs): 3"] }));
    expect(f.spectra[0].meta.setpoint_current_A).toBeUndefined();
    expect(f.warnings.join()).toMatch(/unknown unit "furlongs"/);
  });
  it("several dI/dV columns sharing one bias column are several spectra", () => {
    const lines = ["bias (V),dIdV 1,dIdV 2,dIdV 3"];
    for (let i = 0; i < 20; i++) lines.push([i * 0.01, i, 2 * i, 3 * i].join(","));
    const f = one("line.csv", lines.join("\n"));
    expect(f.spectra.map((s) => s.label)).toEqual(["dIdV 1", "dIdV 2", "dIdV 3"]);
    expect(f.spectra.map((s) => s.index)).toEqual([0, 1, 2]);
    expect(f.spectra[2].didv[5]).toBe(15);
    expect(f.spectra[0].bias_V).toBe(f.spectra[1].bias_V); // shared, not copied
  });
  it("a 64×64 grid (4096 spectra) in one file", () => {
    const n = 64;
    const header = ["bias (mV)", ...Array.from({ length: 4096 }, (_, k) => `dI/dV x${k % 64} y${k >> 6}`)].join("\t");
    const rows = [header];
    for (let i = 0; i < n; i++) {
      const cells = [String(-100 + i * 3)];
      for (let k = 0; k < 4096; k++) cells.push(String((k + 1) * 0.001 + i));
      rows.push(cells.join("\t"));
    }
    const f = one("grid.tsv", rows.join("\n"));
    expect(f.status).toBe("ok");
    expect(f.spectra).toHaveLength(4096);
    expect(f.spectra[4095].label).toBe("dI/dV x63 y63");
    expect(f.spectra[4095].didv[10]).toBeCloseTo(4.096 + 10, 9);
    expect(f.spectra[17].bias_V[1]).toBeCloseTo(-0.097, 12);
  });
  it("a current-only file gets dI/dV as the Savitzky–Golay derivative (exact for a quadratic current)", () => {
    const lines = ["# temperature_K: 4.5", "bias (V),current (nA)"];
    for (let i = 0; i < 50; i++) {
      const v = -0.25 + i * 0.01;
      lines.push(`${v.toFixed(3)},${(2 * v + 3 * v * v).toFixed(9)}`);
    }
    const f = one("iv.csv", lines.join("\n"));
    const s = f.spectra[0];
    expect(s.current_A![0]).toBeCloseTo((2 * -0.25 + 3 * 0.0625) * 1e-9, 15);
    // d/dV (2V + 3V²) nA = (2 + 6V) nS; a quadratic SG derivative is exact for it (polynomial exactness).
    for (let i = 0; i < 50; i++) expect(s.didv[i]).toBeCloseTo((2 + 6 * s.bias_V[i]) * 1e-9, 14);
    expect(s.warnings.join()).toMatch(/derivative of the current/);
  });
  it("cleans with warnings: NaN rows dropped, descending reversed, repeats averaged, non-uniform resampled", () => {
    const lines = ["bias (V),dI/dV"];
    for (let i = 0; i < 30; i++) lines.push(`${(0.3 - i * 0.01).toFixed(3)},${i === 7 ? "NaN" : (0.3 - i * 0.01).toFixed(3)}`);
    const f = one("desc.csv", lines.join("\n"));
    expect(f.status).toBe("ok");
    const s = f.spectra[0];
    const all = [...f.warnings, ...s.warnings].join(" | ");
    expect(s.bias_V[0]).toBeCloseTo(0.01, 12);
    expect(all).toMatch(/dropped 1 row .*line 9/);
    expect(all).toMatch(/descending/);
    // The dropped point leaves a gap in the axis: resampled, and dI/dV = bias survives interpolation.
    expect(all).toMatch(/resampled/);
    for (let i = 0; i < s.bias_V.length; i++) expect(s.didv[i]).toBeCloseTo(s.bias_V[i], 9);

    const rep = ["bias (V),dI/dV", ...[0, 0.01, 0.01, 0.02, 0.05, 0.03, 0.04, 0.06, 0.07, 0.08, 0.09, 0.1].map((v, i) => `${v},${v === 0.01 ? (i === 1 ? 1 : 3) : 0}`)];
    const g = one("rep.csv", rep.join("\n"));
    expect(g.status).toBe("ok");
    expect(g.spectra[0].bias_V).toHaveLength(11);
    expect(g.spectra[0].didv[1]).toBe(2);
    expect(g.warnings.join()).toMatch(/1 repeated bias value averaged/);
  });
});

describe("more layouts", () => {
  it("bias, dI/dV and current columns: one spectrum with its current in A", () => {
    const lines = ["bias (V),dI/dV (nS),current (pA)"];
    for (let i = 0; i < 20; i++) lines.push(`${(i * 0.01).toFixed(2)},${i},${i * 10}`);
    const f = one("three.csv", lines.join("\n"));
    expect(f.spectra).toHaveLength(1);
    expect(f.spectra[0].didv[4]).toBe(4);
    expect(f.spectra[0].current_A![4]).toBeCloseTo(40e-12, 22);
  });
  it("CRLF line endings, quoted header names and quoted cells", () => {
    const lines = ['"Bias [V]","dI/dV (a.u.)"'];
    for (let i = 0; i < 15; i++) lines.push(`"${(i * 0.01).toFixed(2)}","${(2 * i).toFixed(1)}"`);
    const f = one("q.csv", lines.join("\r\n") + "\r\n");
    expect(f.status).toBe("ok");
    expect(f.spectra[0].bias_V[3]).toBeCloseTo(0.03, 12);
    expect(f.spectra[0].didv[3]).toBe(6);
  });
  it("a bias column without a unit whose values exceed 20 is taken as mV, with a warning", () => {
    const f = one("nounit.csv", csv({ header: "bias,dI/dV", scale: 1000 }));
    expect(f.spectra[0].bias_V[0]).toBeCloseTo(-0.2, 12);
    expect(f.warnings.join()).toMatch(/taken as mV/);
  });
  it("numbers are read exactly as JavaScript's Number() reads them (fast path and general path agree)", () => {
    const cells = ["0.1", "-2.5e-3", "1e+2", "123456789012345", "7.00000000000000001", "0.30000000000000004", "+4.25", "-0"];
    const lines = ["bias (V),dI/dV"];
    cells.forEach((c, i) => lines.push(`${i},${c}`));
    for (let i = cells.length; i < 12; i++) lines.push(`${i},1`);
    const f = one("exact.csv", lines.join("\n"));
    cells.forEach((c, i) => expect(Object.is(f.spectra[0].didv[i], Number(c))).toBe(true));
  });
});

describe("bias polarity", () => {
  it("a file whose bias is on the tip is flipped to sample bias (Pitfalls: sample bias > 0 probes empty states)", () => {
    const lines = ["# bias applied to: tip", "bias (V),dI/dV,current (nA)"];
    for (let i = 0; i < 20; i++) lines.push(`${(i * 0.01).toFixed(2)},${i},${i * 2}`);
    const f = one("tip.csv", lines.join("\n"));
    const s = f.spectra[0];
    expect(f.warnings.join()).toMatch(/signs flipped/);
    expect(s.bias_V[0]).toBeCloseTo(-0.19, 12);
    expect(s.didv[0]).toBe(19); // dI/dV keeps its sign
    expect(s.current_A![0]).toBeCloseTo(-38e-9, 20); // the current changes sign
  });
});

describe("rejections name the problem and the line", () => {
  const cases: [string, string | Uint8Array, RegExp][] = [
    ["empty", "", /empty file/],
    ["whitespace only", "  \n\n ", /empty file/],
    ["binary", new Uint8Array([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 3, 0, 0x3e, 0]), /binary/],
    ["ragged", csv().replace("\n-0.1500,", "\n-0.1500,1,"), /line 7: ragged row with 3 cells where 2 were expected/],
    ["non-numeric", csv().replace("-0.1000,1.010000", "-0.1000,abc"), /line 12, column 2: "abc" is not a number/],
    ["too few points", csv({ n: 9 }), /only 9 usable points; a spectrum needs at least 10/],
    ["constant bias", ["bias (V),dI/dV", ...Array.from({ length: 20 }, (_, i) => `0.1,${i}`)].join("\n"), /bias is constant/],
    ["infinite", csv().replace("-0.1000,1.010000", "-0.1000,inf"), /line 12, column 2: non-finite value "inf"/],
    ["Infinity", csv().replace("-0.1000,1.010000", "-0.1000,-Infinity"), /line 12, column 2: non-finite value/],
    ["header only", "bias (V),dI/dV (a.u.)\n", /no numeric data rows after the header on line 1/],
    ["header/data mismatch", csv().replace("dI/dV (a.u.)", "dI/dV (a.u.),current (pA)"), /header has 3 columns but the data on line 2 has 2/],
  ];
  for (const [what, text, re] of cases) {
    it(what, () => {
      const f = one("bad.csv", text);
      expect(f.status).toBe("error");
      expect(f.spectra).toHaveLength(0);
      expect(f.message).toMatch(re);
    });
  }
  it("size limits: file bytes, columns, points", () => {
    expect(one("big.csv", csv(), { maxFileBytes: 100 }).message).toMatch(/over the limit of 100/);
    const wide = ["bias," + Array.from({ length: 12 }, (_, i) => `g${i}`).join(","), ...Array.from({ length: 20 }, (_, r) => [r, ...Array(12).fill(1)].join(","))].join("\n");
    expect(one("wide.csv", wide, { maxColumns: 10 }).message).toMatch(/13 columns exceed the limit of 10/);
    expect(one("long.csv", csv({ n: 50 }), { maxPoints: 30 }).message).toMatch(/50 data rows exceed the limit of 30/);
    expect(DEFAULT_IMPORT_LIMITS.maxColumns).toBeGreaterThan(4096);
  });
});

describe("JSON of our own shape", () => {
  const s = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.1, step_V: 0.01, seed: 3 });
  it("a bare array of spectrum objects is accepted", () => {
    const f = one("arr.json", JSON.stringify([{ bias_V: Array.from(s.bias_V), didv: Array.from(s.didv) }]));
    expect(f.status).toBe("ok");
    expect(f.spectra[0].didv[5]).toBe(s.didv[5]);
  });
  it("reads spectra, shared and own metadata, bias in mV", () => {
    const doc = {
      format: "bandcross-spectra",
      version: 1,
      meta: { "temperature (K)": 4.5 },
      spectra: [
        { label: "first", bias_V: Array.from(s.bias_V), didv: Array.from(s.didv), meta: { setpoint_current_A: 1e-10 } },
        { bias_mV: Array.from(s.bias_V, (v) => v * 1000), current_A: Array.from(s.current_A) },
      ],
    };
    const f = one("s.json", JSON.stringify(doc));
    expect(f.status).toBe("ok");
    expect(f.spectra).toHaveLength(2);
    expect(f.spectra[0].label).toBe("first");
    expect(f.spectra[0].meta).toMatchObject({ temperature_K: 4.5, setpoint_current_A: 1e-10 });
    expect(f.spectra[1].bias_V[3]).toBeCloseTo(s.bias_V[3], 12);
    expect(f.spectra[1].warnings.join()).toMatch(/derivative/);
  });
  it("rejects a wrong shape with the path of the problem", () => {
    expect(one("x.json", '{"spectra":[{"bias_V":[1,2]}]}').message).toMatch(/spectra.0: needs didv or current_A/);
    expect(one("x.json", "{not json").message).toMatch(/invalid JSON/);
    expect(one("x.json", '[{"file":"a.csv","gap_eV":0.1}]').message).toMatch(/spectra.0: needs bias_V or bias_mV/);
    expect(one("x.json", '{"spectra":[{"bias_V":[1,2,3],"didv":[1,2]}]}').message).toMatch(/didv has 2 values but the bias has 3/);
  });
});

describe("zip archives (in memory)", () => {
  const good = enc(csv());
  it("one entry per file, named archive/entry; directories and dot-files skipped", () => {
    const z = zipSync({ "a.csv": good, "sub/b.csv": good, "sub/": new Uint8Array(0), "__MACOSX/._a.csv": good, ".hidden": good, "bad.csv": enc("x\n") });
    const r = importSpectra("run.zip", z);
    expect(r.map((f) => f.file).sort()).toEqual(["run.zip/a.csv", "run.zip/bad.csv", "run.zip/sub/b.csv"]);
    expect(r.find((f) => f.file === "run.zip/a.csv")!.spectra[0].file).toBe("run.zip/a.csv");
    expect(r.find((f) => f.file === "run.zip/bad.csv")!.status).toBe("error");
  });
  it("refuses entries whose names leave the archive (zip-slip) or are absolute", () => {
    const z = zipSync({ "../evil.csv": good, "/etc/passwd.csv": good, "C:/x.csv": good, "ok/../../up.csv": good, "fine.csv": good });
    const r = importSpectra("slip.zip", z);
    const byName = Object.fromEntries(r.map((f) => [f.file, f]));
    expect(byName["slip.zip/../evil.csv"].message).toMatch(/outside the archive/);
    expect(byName["slip.zip//etc/passwd.csv"].message).toMatch(/absolute path/);
    expect(byName["slip.zip/C:/x.csv"].message).toMatch(/drive letter/);
    expect(byName["slip.zip/ok/../../up.csv"].message).toMatch(/outside the archive/);
    expect(byName["slip.zip/fine.csv"].status).toBe("ok");
  });
  it("too many entries, too large expanded, and a zip bomb fail the whole archive", () => {
    const many = zipSync(Object.fromEntries(Array.from({ length: 6 }, (_, i) => [`f${i}.csv`, good])));
    const r1 = importSpectra("many.zip", many, { maxZipEntries: 5 });
    expect(r1).toHaveLength(1);
    expect(r1[0].message).toMatch(/more than 5 entries/);
    const r2 = importSpectra("many.zip", many, { maxZipExpandedBytes: 1000 });
    expect(r2).toHaveLength(1);
    expect(r2[0].message).toMatch(/expands to \d+ bytes, over the limit of 1000/);
    const bomb = zipSync({ "zeros.csv": new Uint8Array(20 * 1024 * 1024) }, { level: 9 });
    expect(bomb.length).toBeLessThan(100_000);
    const r3 = importSpectra("bomb.zip", bomb);
    expect(r3).toHaveLength(1);
    expect(r3[0].status).toBe("error");
    expect(r3[0].message).toMatch(/zip bomb/);
  });
  it("a .zip that is not an archive, and nested archives", () => {
    expect(importSpectra("x.zip", enc("hello"))[0].message).toMatch(/not a zip archive/);
    const nested = zipSync({ "inner.zip": zipSync({ "a.csv": good }) });
    expect(importSpectra("outer.zip", nested)[0].message).toMatch(/nested archives/);
    expect(importSpectra("strToU8.zip", zipSync({ "t.csv": strToU8(csv()) }))[0].status).toBe("ok");
  });
});
