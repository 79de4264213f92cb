/** Shapes produced by the importers (see import/index.ts). */

/** Canonical spectrum metadata. Units are in the key names; `extra` keeps every other key verbatim. */
export interface SpectrumMeta {
  setpoint_bias_V?: number;
  setpoint_current_A?: number;
  /** z offset after opening the feedback, pm; negative = tip moved closer. */
  z_offset_pm?: number;
  /** Lock-in modulation, mV rms. */
  lockin_modulation_mV_rms?: number;
  temperature_K?: number;
  x_nm?: number;
  y_nm?: number;
  region?: string;
  extra: Record<string, string>;
}

export interface ParsedSpectrum {
  /** File name (for a zip entry "archive.zip/entry.csv"). */
  file: string;
  /** Position of the spectrum within its file, from 0. */
  index: number;
  /** Column name, or "spectrum N". */
  label: string;
  /** Sample bias, V, ascending and uniform. */
  bias_V: Float64Array;
  /** dI/dV, arbitrary units as recorded (or the Savitzky–Golay derivative of the current, S). */
  didv: Float64Array;
  /** Tunnelling current, A, when the file has a current column. */
  current_A: Float64Array | null;
  meta: SpectrumMeta;
  warnings: string[];
}

export interface ImportedFile {
  file: string;
  status: "ok" | "error";
  message?: string;
  warnings: string[];
  spectra: ParsedSpectrum[];
}

/** Limits applied to every input (defaults in settings.ts, DEFAULT_IMPORT_LIMITS). */
export interface ImportLimits {
  /** Largest single file (or zip entry, expanded), bytes. */
  maxFileBytes: number;
  /** Most columns in a delimited file. */
  maxColumns: number;
  /** Most points (rows) per spectrum. */
  maxPoints: number;
  /** Fewest points per spectrum after cleaning. */
  minPoints: number;
  /** Most entries in a zip archive. */
  maxZipEntries: number;
  /** Largest total expanded size of a zip archive, bytes. */
  maxZipExpandedBytes: number;
  /** Largest expanded/compressed size ratio of any zip entry. */
  maxZipRatio: number;
}

/** Thrown by the parsers; caught by importSpectra and turned into an error entry. */
export class ImportError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ImportError";
  }
}
