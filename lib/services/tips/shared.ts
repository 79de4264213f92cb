import "server-only";
import { tipInput } from "@/lib/schemas/lab";

export function values(data: ReturnType<typeof tipInput.parse>) {
  return {
    label: data.label,
    material: data.material,
    workFunctionEv: data.workFunction_eV,
    workFunctionSigmaEv: data.workFunctionSigma_eV,
    preparedOn: data.preparedOn ?? null,
    notes: data.notes ?? null,
  };
}
