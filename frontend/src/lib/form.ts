import type { UseFormRegisterReturn } from 'react-hook-form';

/**
 * Connects a react-hook-form registration to an MUI TextField: the ref goes to the input itself,
 * the message shows under the field, and it is announced when it appears.
 */
export function fieldProps(registration: UseFormRegisterReturn, error: string | undefined) {
  const { ref, ...rest } = registration;
  return {
    ...rest,
    inputRef: ref,
    error: Boolean(error),
    helperText: error,
    slotProps: {
      htmlInput: { 'aria-required': true },
      formHelperText: error ? { role: 'alert' } : undefined,
    },
  };
}
