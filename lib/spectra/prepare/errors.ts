/** A request the preparation of spectra refuses (mismatched members, a range without 0 V…); the message says why. */
export class PrepareError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PrepareError";
  }
}
