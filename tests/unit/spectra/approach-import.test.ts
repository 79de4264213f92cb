import { strToU8, zipSync } from "fflate";
import { describe, expect, it } from "vitest";
import { fileKind, fitBarrier, importApproachCurves } from "@/lib/spectra";
import { groupSweeps } from "@/lib/spectra/import/approach";

/** 30 points from z = +300 pm to −280 pm, the current 100 pA·exp(−2·10/nm·z); values checked below. */
function curveText(
  opts: {
    header?: string;
    sep?: string;
    zScale?: number;
    iScale?: number;
    meta?: string[];
    extra?: (i: number) => string;
  } = {},
) {
  const sep = opts.sep ?? ",";
  const lines = [...(opts.meta ?? []), opts.header ?? ["z (pm)", "current (pA)"].join(sep)];
  for (let i = 0; i < 30; i++) {
    const zNm = 0.3 - i * 0.02;
    const row = [
      (zNm * (opts.zScale ?? 1000)).toFixed(3),
      (100 * Math.exp(-20 * zNm) * (opts.iScale ?? 1)).toPrecision(8),
    ];
    if (opts.extra) row.push(opts.extra(i));
    lines.push(row.join(sep));
  }
  return lines.join("\n") + "\n";
}

const one = (name: string, text: string | Uint8Array) => {
  const r = importApproachCurves(name, typeof text === "string" ? strToU8(text) : text);
  expect(r).toHaveLength(1);
  return r[0];
};

describe("approach and retraction in two columns", () => {
  // z from +300 pm in to −280 pm; the approach with κ = 10/nm, the retraction read on a 2% longer z
  // scale (piezo hysteresis: κ_ret = 10.2/nm as recorded), both exact exponentials.
  const rows = ["z (pm),I approach (pA),I retract (pA)"];
  for (let i = 0; i < 30; i++) {
    const zNm = 0.3 - i * 0.02;
    rows.push([(zNm * 1000).toFixed(3), (100 * Math.exp(-20 * zNm)).toPrecision(9), (100 * Math.exp(-20.4 * zNm)).toPrecision(9)].join(","));
  }
  it("make one curve, in and back out, that the fit splits into its two sweeps", () => {
    const f = one("iz.csv", rows.join("\n") + "\n");
    expect(f.curves).toHaveLength(1);
    const c = f.curves[0];
    expect(c.label).toBe("I approach + I retract");
    expect(c.warnings).toContain('columns "I approach" and "I retract" read as one curve, forth and back');
    expect(c.z_nm.length).toBe(60);
    // In: +0.3 … −0.28 nm; back out: −0.28 … +0.3 nm, each current with its own z.
    expect([c.z_nm[0], c.z_nm[29], c.z_nm[30], c.z_nm[59]].map((v) => Number(v.toFixed(6)))).toEqual([0.3, -0.28, -0.28, 0.3]);
    expect(c.current_A[59]).toBeCloseTo(100e-12 * Math.exp(-20.4 * 0.3), 20);
    const fit = fitBarrier(c);
    expect(fit.sweeps.map((s) => s.direction)).toEqual(["approach", "retraction"]);
    // I ∝ exp(−2κz): κ = 20/2 and 20.4/2 per nm, exactly (noise-free data).
    expect(fit.sweeps[0].kappa_per_nm).toBeCloseTo(10, 4);
    expect(fit.sweeps[1].kappa_per_nm).toBeCloseTo(10.2, 4);
  });
  it("pair the i-th approach with the i-th retraction; other columns stay curves of their own", () => {
    expect(groupSweeps(["I approach 1", "I retract 1", "I approach 2", "I retract 2"])).toEqual([[0, 1], [2, 3]]);
    expect(groupSweeps(["I bwd", "I fwd", "current"])).toEqual([[1, 0], [2]]);
    expect(groupSweeps(["current 1", "current 2"])).toEqual([[0], [1]]);
    expect(groupSweeps(["I approach", "I approach again"])).toEqual([[0], [1]]);
  });
});

describe("I(z) curves from delimited text", () => {
  it("z in pm and the current in pA, with metadata lines; negative z kept as closer, order kept", () => {
    const f = one(
      "iz.csv",
      curveText({ meta: ["# setpoint bias (mV): 100", "# setpoint current (pA): 100", "# temperature_K: 4.5"] }),
    );
    expect(f.status).toBe("ok");
    const c = f.curves[0];
    expect(c.z_nm[0]).toBeCloseTo(0.3, 12); // 300 pm = 0.3 nm
    expect(c.z_nm[29]).toBeCloseTo(-0.28, 12);
    expect(c.current_A[0]).toBeCloseTo(100e-12 * Math.exp(-6), 20); // pA → A
    expect(c.meta).toMatchObject({ setpoint_bias_V: 0.1, setpoint_current_A: 1e-10, temperature_K: 4.5 });
    expect(c.label).toBe("current");
  });
  it("z [nm] with I [nA], tab-separated; z (Å) and current (A)", () => {
    const a = one("iz.tsv", curveText({ header: "z [nm]\tI [nA]", sep: "\t", zScale: 1, iScale: 1e-3 }));
    expect(a.curves[0].z_nm[1]).toBeCloseTo(0.28, 12);
    expect(a.curves[0].current_A[1]).toBeCloseTo(100e-12 * Math.exp(-5.6), 18);
    // 1 Å = 0.1 nm (SI).
    const b = one("iz.txt", curveText({ header: "z (Å),current (A)", zScale: 10, iScale: 1e-12 }));
    expect(b.curves[0].z_nm[1]).toBeCloseTo(0.28, 12);
    expect(b.curves[0].current_A[1]).toBeCloseTo(100e-12 * Math.exp(-5.6), 18);
  });
  it("several current columns are several curves; a missing cell drops its row with the line named", () => {
    const f = one(
      "two.csv",
      curveText({ header: "z (pm),current 1 (pA),current 2 (pA)", extra: (i) => (i === 4 ? "nan" : "7") }),
    );
    expect(f.curves.map((c) => c.label)).toEqual(["current 1", "current 2"]);
    expect(f.curves[0].z_nm).toHaveLength(30);
    expect(f.curves[1].z_nm).toHaveLength(29);
    // Line 1 is the header: the fifth data row is line 6.
    expect(f.curves[1].warnings).toEqual(["dropped 1 row with missing values (line 6)"]);
  });
  it("a z without a unit: nm up to 10, pm beyond, with a warning", () => {
    expect(one("a.csv", curveText({ header: "z,current (pA)", zScale: 1 })).warnings).toContain(
      "z has no unit: taken as nm",
    );
    const pm = one("b.csv", curveText({ header: "z,current (pA)" }));
    expect(pm.warnings).toContain("z has no unit: taken as pm (its values exceed 10)");
    expect(pm.curves[0].z_nm[0]).toBeCloseTo(0.3, 12);
  });
  it("a spectrum is refused with a message; an unknown z unit too", () => {
    const s = one(
      "spectrum.csv",
      "bias (V),dI/dV (a.u.)\n" + Array.from({ length: 20 }, (_, i) => `${i / 10},1`).join("\n"),
    );
    expect(s).toMatchObject({
      status: "error",
      message: "no z column, and columns named like a bias or dI/dV: a spectrum, not an I(z) curve",
    });
    expect(one("u.csv", curveText({ header: "z (furlong),current (pA)" })).message).toBe(
      'z column "z" has unknown unit "furlong"',
    );
  });
});

describe("I(z) curves: JSON and zip", () => {
  it("the bandcross-approach JSON shape, z in pm or nm, shared and own metadata", () => {
    const json = JSON.stringify({
      format: "bandcross-approach",
      version: 1,
      meta: { "setpoint bias (V)": 0.1 },
      curves: [
        {
          label: "a",
          z_pm: Array.from({ length: 12 }, (_, i) => 200 - 40 * i),
          current_A: Array.from({ length: 12 }, (_, i) => 1e-12 * (i + 1)),
        },
        {
          z_nm: Array.from({ length: 12 }, (_, i) => 0.2 - 0.04 * i),
          current_A: Array.from({ length: 12 }, () => 1e-12),
          meta: { "setpoint current (pA)": 50 },
        },
      ],
    });
    const f = one("iz.json", json);
    expect(f.status).toBe("ok");
    expect(f.curves.map((c) => c.label)).toEqual(["a", "curve 2"]);
    expect(f.curves[0].z_nm[1]).toBeCloseTo(0.16, 12);
    expect(f.curves[1].meta).toMatchObject({ setpoint_bias_V: 0.1, setpoint_current_A: 50e-12 });
    expect(one("bad.json", JSON.stringify({ curves: [{ current_A: [1, 2] }] })).message).toMatch(
      /^JSON does not have the bandcross-approach shape: curves\.0: needs z_nm or z_pm/,
    );
  });
  it("a zip of curves: one entry each, unsafe names refused", () => {
    const zip = zipSync({
      "a.csv": strToU8(curveText()),
      "b.csv": strToU8(curveText({ header: "height (nm),current (pA)", zScale: 1 })),
      "../x.csv": strToU8(curveText()),
    });
    const r = importApproachCurves("run.zip", zip);
    expect(r.map((e) => [e.file, e.status])).toEqual([
      ["run.zip/a.csv", "ok"],
      ["run.zip/b.csv", "ok"],
      ["run.zip/../x.csv", "error"],
    ]);
  });
});

describe("fileKind: an I(z) file is told by its columns", () => {
  it("z and current: approach; bias and dI/dV, or bias and current: spectra", () => {
    expect(fileKind("iz.csv", strToU8(curveText()))).toBe("approach");
    expect(fileKind("iz.tsv", strToU8(curveText({ header: "Z position [nm]\tcurrent [nA]", sep: "\t" })))).toBe(
      "approach",
    );
    expect(fileKind("s.csv", strToU8("bias (V),dI/dV (a.u.)\n0,1\n0.1,2\n"))).toBe("spectra");
    expect(fileKind("iv.csv", strToU8("bias (V),current (pA)\n0,1\n0.1,2\n"))).toBe("spectra");
    expect(fileKind("iz.json", strToU8(JSON.stringify({ format: "bandcross-approach", curves: [] })))).toBe("approach");
    expect(fileKind("s.json", strToU8(JSON.stringify({ spectra: [{ bias_V: [0, 1], didv: [1, 2] }] })))).toBe(
      "spectra",
    );
  });
});
