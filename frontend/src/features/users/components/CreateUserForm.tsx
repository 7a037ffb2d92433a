import { useState } from 'react';
import { useForm } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import {
  PASSWORD_MIN_LENGTH,
  ROLE_LABELS,
  ROLES,
  type CreateUserRequest,
  type Role,
} from '@kinpath/contracts';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useCreateUser } from '../api/users';
import { DepartmentField, departmentRule, useDepartmentCodes } from './DepartmentField';

interface CreateUserFields {
  displayName: string;
  email: string;
  role: Role;
  department: string;
  password: string;
}

const EMPTY: CreateUserFields = {
  displayName: '',
  email: '',
  role: 'advisor',
  department: '',
  password: '',
};

const EMAIL_PATTERN = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

function createFailureMessage(error: unknown): string {
  const status = httpStatus(error);
  if (status === 409) return 'An account with this e-mail address exists already.';
  if (status === 400) return apiMessage(error) ?? 'The server refused these details.';
  if (status === 403) return 'Only administrators can create accounts.';
  return 'The account could not be created. Try again in a moment.';
}

export function CreateUserForm() {
  const createUser = useCreateUser();
  const [created, setCreated] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    watch,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<CreateUserFields>({ defaultValues: EMPTY });
  const role = watch('role');
  const codes = useDepartmentCodes();
  const roleField = fieldProps(register('role'), errors.role?.message);

  const onSubmit = handleSubmit(async (values) => {
    setCreated(null);
    const request: CreateUserRequest = {
      email: values.email.trim(),
      displayName: values.displayName.trim(),
      role: values.role,
      // Without a password the server sends an invitation e-mail instead.
      ...(values.password ? { password: values.password } : {}),
      ...(values.role === 'department_head' ? { department: values.department } : {}),
    };
    try {
      const user = await createUser.mutateAsync(request);
      setCreated(
        [`Account created for ${user.displayName} (${user.email}).`, user.notice]
          .filter(Boolean)
          .join(' '),
      );
      reset(EMPTY);
    } catch {
      // Shown from the mutation's error below.
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate>
      <Stack spacing={2}>
        {created ? (
          <Alert severity="success" role="status">
            {created}
          </Alert>
        ) : null}
        {createUser.isError ? (
          <Alert severity="error" role="alert">
            {createFailureMessage(createUser.error)}
          </Alert>
        ) : null}
        <TextField
          label="Name"
          autoComplete="off"
          {...fieldProps(
            register('displayName', {
              validate: (value) => (value.trim() ? true : 'Enter the person’s name.'),
              maxLength: { value: 120, message: 'Keep the name under 120 characters.' },
            }),
            errors.displayName?.message,
          )}
        />
        <TextField
          label="E-mail"
          type="email"
          autoComplete="off"
          {...fieldProps(
            register('email', {
              validate: (value) => {
                if (!value.trim()) return 'Enter an e-mail address.';
                return EMAIL_PATTERN.test(value.trim())
                  ? true
                  : 'Enter a complete e-mail address, such as name@university.edu.';
              },
            }),
            errors.email?.message,
          )}
        />
        <TextField
          select
          label="Role"
          {...roleField}
          slotProps={{ ...roleField.slotProps, select: { native: true } }}
        >
          {ROLES.map((value) => (
            <option key={value} value={value}>
              {ROLE_LABELS[value]}
            </option>
          ))}
        </TextField>
        {role === 'department_head' ? (
          <DepartmentField
            registration={register('department', {
              // Unregistered when hidden, so other roles never send a department.
              shouldUnregister: true,
              validate: departmentRule(codes),
            })}
            error={errors.department?.message}
          />
        ) : null}
        <TextField
          label="Password"
          type="password"
          autoComplete="new-password"
          {...fieldProps(
            register('password', {
              minLength: {
                value: PASSWORD_MIN_LENGTH,
                message: `Use at least ${PASSWORD_MIN_LENGTH} characters.`,
              },
            }),
            errors.password?.message,
          )}
          slotProps={{
            htmlInput: { 'aria-required': false },
            formHelperText: errors.password?.message ? { role: 'alert' } : undefined,
          }}
          helperText={
            errors.password?.message ??
            `Optional: leave it empty to send an invitation e-mail (the link works for 72 hours). With a password of at least ${PASSWORD_MIN_LENGTH} characters the account can sign in at once.`
          }
        />
        <Button
          type="submit"
          variant="contained"
          loading={isSubmitting}
          sx={{ alignSelf: 'flex-start' }}
        >
          Create account
        </Button>
      </Stack>
    </form>
  );
}
