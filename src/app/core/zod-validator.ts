import type { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import type { z } from 'zod';

/**
 * A form-control validator from a zod schema, so the browser checks a field with the very
 * rule the server applies. The first issue's message is kept under the `zod` key.
 */
export function zodValidator(schema: z.ZodType): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const result = schema.safeParse(control.value);
    return result.success ? null : { zod: result.error.issues[0]?.message ?? 'This value is not valid.' };
  };
}

/** The message zodValidator stored on a control, or '' when it is valid. */
export function zodMessage(control: AbstractControl): string {
  const message: unknown = control.errors?.['zod'];
  return typeof message === 'string' ? message : '';
}
