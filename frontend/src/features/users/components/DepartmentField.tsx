import TextField from '@mui/material/TextField';
import type { UseFormRegisterReturn } from 'react-hook-form';
import { unknownDepartmentMessage } from '@kinpath/contracts';
import { fieldProps } from '../../../lib/form';
import { useDepartments } from '../api/users';

/** The check a head's department passes: one of the listed codes. */
export function departmentRule(codes: readonly string[] | undefined) {
  return (value: string) => {
    if (!value) return 'Choose the department a head is responsible for.';
    if (codes && !codes.includes(value)) return unknownDepartmentMessage(value);
    return true;
  };
}

/** A head's department, chosen from the list rather than typed, so no unknown code goes out. */
export function DepartmentField({
  registration,
  error,
}: {
  registration: UseFormRegisterReturn;
  error: string | undefined;
}) {
  const departments = useDepartments();
  const props = fieldProps(registration, error ?? (departments.isError ? LOAD_FAILED : undefined));
  return (
    <TextField
      select
      label="Department"
      {...props}
      slotProps={{ ...props.slotProps, select: { native: true }, inputLabel: { shrink: true } }}
      disabled={departments.isPending}
    >
      <option value="">{departments.isPending ? 'Loading departments…' : 'Choose…'}</option>
      {(departments.data ?? []).map((d) => (
        <option key={d.code} value={d.code}>
          {d.name ? `${d.code} — ${d.name}` : d.code}
        </option>
      ))}
    </TextField>
  );
}

const LOAD_FAILED = 'The departments could not be loaded. Reload the page to try again.';

/** The codes to check against once loaded; undefined while loading. */
export function useDepartmentCodes(): string[] | undefined {
  return useDepartments().data?.map((d) => d.code);
}
