import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link as RouterLink } from 'react-router';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Link from '@mui/material/Link';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import { useMutation } from '@tanstack/react-query';
import type { PasswordResetRequest } from '@kinpath/contracts';
import { apiClient, apiMessage } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { PublicFrame } from './PublicFrame';

const EMAIL_PATTERN = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

/** Asks for a reset link; the answer is the same whether or not the address has an account. */
export function ForgotPasswordPage() {
  const [sent, setSent] = useState<string | null>(null);
  const request = useMutation({
    mutationFn: async (body: PasswordResetRequest) =>
      (await apiClient.post<{ message: string }>('/auth/password-reset', body)).data,
  });
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm<{ email: string }>({ defaultValues: { email: '' } });

  const onSubmit = handleSubmit(async ({ email }) => {
    try {
      setSent((await request.mutateAsync({ email: email.trim() })).message);
    } catch {
      // Shown below.
    }
  });

  return (
    <PublicFrame
      title="Reset your password"
      lead="Enter the e-mail address you sign in with; a link to choose a new password will follow."
    >
      <form onSubmit={onSubmit} noValidate>
        <Stack spacing={2.25}>
          {sent ? (
            <Alert severity="success" role="status">
              {sent}
            </Alert>
          ) : null}
          {request.isError ? (
            <Alert severity="error" role="alert">
              {apiMessage(request.error) ?? 'The request could not be sent. Try again in a moment.'}
            </Alert>
          ) : null}
          <TextField
            label="E-mail"
            type="email"
            autoComplete="username"
            {...fieldProps(
              register('email', {
                validate: (value) =>
                  EMAIL_PATTERN.test(value.trim())
                    ? true
                    : 'Enter a complete e-mail address, such as name@university.edu.',
              }),
              errors.email?.message,
            )}
          />
          <Button type="submit" variant="contained" size="large" loading={isSubmitting}>
            Send reset link
          </Button>
          <Link component={RouterLink} to="/sign-in">
            Back to sign-in
          </Link>
        </Stack>
      </form>
    </PublicFrame>
  );
}
