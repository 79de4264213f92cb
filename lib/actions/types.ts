/** What every form action returns to its form (shared by server actions and client forms). */
export interface ActionState {
  ok: boolean;
  message?: string;
  fieldErrors?: Record<string, string[]>;
  /** Values echoed back so a failed form keeps what the person typed. */
  values?: Record<string, string>;
  /** Anything the form should show once (e.g. a new API token). */
  data?: Record<string, unknown>;
}
