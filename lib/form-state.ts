/** What every form action returns: a status, a message and each field's errors; never a password. */
export interface FormState {
  status: number;
  message?: string;
  fieldErrors?: Record<string, string[]>;
  /** Non-secret values typed so far, so a failed submit keeps them. */
  values?: Record<string, string>;
}

export const initialFormState: FormState = { status: 0 };
