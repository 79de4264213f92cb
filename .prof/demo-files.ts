import fs from "node:fs";
import { approachToCsv, decayConstant_per_nm, makeApproachCurve, makeSweep, spectrumToCsv, type ApproachModel } from "@/lib/spectra";
const dir = "/tmp/demo-gx12";
fs.mkdirSync(dir, { recursive: true });
const sweep = makeSweep({ n: 24, seed: 2026, fieldModel: { tipWorkFunction_eV: 4.7, sampleWorkFunction_eV: 3.9 }, noise: 0.03 });
sweep.spectra.forEach((s, i) => fs.writeFileSync(`${dir}/gx12-approach-${String(i + 1).padStart(2, "0")}.csv`, spectrumToCsv(s)));
const izMeta = (T: number) => ({ setpoint_bias_V: 0.1, setpoint_current_A: 1e-10, temperature_K: T });
const gxCurves: ApproachModel[] = [
  { kappa_per_nm: decayConstant_per_nm(4.3), seed: 11 },
  { kappa_per_nm: decayConstant_per_nm(4.3), seed: 12, contact: { at_nm: -0.24, conductance_G0: 0.6 }, zTo_nm: -0.3 },
  { kappa_per_nm: decayConstant_per_nm(4.3), seed: 13, saturation_A: 1e-8, zTo_nm: -0.32 },
  { kappa_per_nm: decayConstant_per_nm(4.3), seed: 14, retractionScale: 1.01 },
];
gxCurves.forEach((m, i) => {
  const c = makeApproachCurve({ relNoise: 0.02, floor_A: 0.8e-12, zFrom_nm: 0.35, n: 160, retraction: true, ...m });
  fs.writeFileSync(`${dir}/gx12-iz-${i + 1}.csv`, approachToCsv({ ...c, meta: izMeta(4.6) }));
});
