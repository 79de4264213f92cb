import { describe, expect, it } from "vitest";
import { labs } from "@/db/schema";
import { labSlug, NEW_LAB_DEFAULTS, newLabInput, setupInput, slugFromName } from "@/lib/schemas/lab";

/**
 * A new lab's input: its address (slug), the work functions its forms start from, and the setup
 * form's own fields. Sources beside each check.
 */

describe("a new lab's work functions", () => {
  it("start from the labs table's column defaults, so the forms and the database agree", () => {
    expect(NEW_LAB_DEFAULTS).toEqual({
      defaultTipWorkFunction_eV: labs.defaultTipWorkFunctionEv.default,
      defaultTipWorkFunctionSigma_eV: labs.defaultTipWorkFunctionSigmaEv.default,
      defaultSampleWorkFunction_eV: labs.defaultSampleWorkFunctionEv.default,
      defaultSampleWorkFunctionSigma_eV: labs.defaultSampleWorkFunctionSigmaEv.default,
    });
    // Polycrystalline W, the common tip, is 4.32-4.55 eV (CRC Handbook, from memory): 4.5 lies inside.
    expect(NEW_LAB_DEFAULTS.defaultTipWorkFunction_eV).toBeGreaterThanOrEqual(4.32);
    expect(NEW_LAB_DEFAULTS.defaultTipWorkFunction_eV).toBeLessThanOrEqual(4.55);
  });
});

describe("a lab's address", () => {
  it("is lowercase letters, digits and single hyphens from a letter, and never the demo lab's", () => {
    for (const ok of ["okafor-group", "lab2", "stm-4k-bay-2"]) expect(labSlug.safeParse(ok).success).toBe(true);
    expect(labSlug.parse("  Okafor-Group ")).toBe("okafor-group"); // typed with capitals and spaces
    for (const bad of ["ab", "2lab", "-lab", "lab-", "lab--two", "lab two", "läb", "demo", "x".repeat(41)]) {
      expect(labSlug.safeParse(bad).success, bad).toBe(false);
    }
  });

  it("is made from the name when left blank: accents dropped, other characters to hyphens", () => {
    expect(slugFromName("Ångström Probes")).toBe("angstrom-probes");
    expect(slugFromName("Surface Physics (2D) Group!")).toBe("surface-physics-2d-group");
    expect(slugFromName("42nd Street Lab")).toBe("nd-street-lab");
    expect(slugFromName("Demo")).toBe("lab-demo");
    expect(slugFromName("超伝導")).toBe("lab");
    for (const name of ["Ångström Probes", "Demo", "超伝導", "A", "x".repeat(80)]) {
      expect(labSlug.safeParse(slugFromName(name)).success, name).toBe(true);
    }
    expect(newLabInput.parse({ ...NEW_LAB_DEFAULTS, name: "Lab", slug: "  " }).slug).toBeUndefined();
  });
});

describe("the setup form", () => {
  it("needs the code, an owner, an e-mail and a password of 10 characters or more", () => {
    const r = setupInput.safeParse({
      ...NEW_LAB_DEFAULTS,
      name: "Lab",
      code: "",
      ownerName: "",
      email: "x",
      password: "short",
    });
    expect(r.success).toBe(false);
    const fields = new Set(r.error!.issues.map((i) => i.path.join(".")));
    expect([...fields].sort()).toEqual(["code", "email", "ownerName", "password"]);
  });
});
