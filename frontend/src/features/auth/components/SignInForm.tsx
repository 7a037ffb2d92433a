import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import { apiMessage, httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useAuth } from '../AuthProvider';
import { useLogin } from '../api/useLogin';
import { dismissSignInNotice, readSignInNotice } from '../session';

interface SignInFields {
  email: string;
  password: string;
}

export const WRONG_CREDENTIALS_MESSAGE = 'E-mail or password is not correct.';
const EMAIL_PATTERN = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

export function signInFailureMessage(error: unknown): string {
  const status = httpStatus(error);
  if (status === 401) return WRONG_CREDENTIALS_MESSAGE;
  if (status === 429) {
    return apiMessage(error) ?? 'Too many sign-in attempts. Wait a minute, then try again.';
  }
  // A deactivated account, after its correct password: the server says whom to ask.
  if (status === 403) return apiMessage(error) ?? 'This account is not active.';
  if (status === 400) return apiMessage(error) ?? 'Check the e-mail address and the password.';
  if (status === undefined) {
    return 'The Kinpath server could not be reached. Check the connection and try again.';
  }
  return 'Signing in failed on the server. Try again in a moment.';
}

export function SignInForm() {
  const { signIn } = useAuth();
  const login = useLogin();
  // Why the last session ended (e.g. it expired), shown once.
  const [notice] = useState(readSignInNotice);
  useEffect(() => {
    if (notice) dismissSignInNotice();
  }, [notice]);

  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting, submitCount },
  } = useForm<SignInFields>({ defaultValues: { email: '', password: '' } });

  const onSubmit = handleSubmit(
    async ({ email, password }) => {
      try {
        signIn(await login.mutateAsync({ email: email.trim(), password }));
      } catch {
        // The mutation keeps the error; it is shown below.
      }
    },
    // A new attempt with empty fields should not keep showing the last server answer.
    () => login.reset(),
  );

  const failure = login.isError ? signInFailureMessage(login.error) : null;

  return (
    <form onSubmit={onSubmit} noValidate>
      <Stack spacing={2.25}>
        {notice && !failure ? (
          <Alert severity="info" role="status">
            {notice}
          </Alert>
        ) : null}
        {failure ? (
          // Keyed by attempt so the same message is announced again after another try.
          <Alert key={submitCount} severity="error" role="alert">
            {failure}
          </Alert>
        ) : null}
        <TextField
          label="E-mail"
          type="email"
          autoComplete="username"
          {...fieldProps(
            register('email', {
              validate: (value) => {
                const email = value.trim();
                if (!email) return 'Enter your e-mail address.';
                if (!EMAIL_PATTERN.test(email)) {
                  return 'Enter a complete e-mail address, such as name@university.edu.';
                }
                return true;
              },
            }),
            errors.email?.message,
          )}
        />
        <TextField
          label="Password"
          type="password"
          autoComplete="current-password"
          {...fieldProps(
            register('password', { required: 'Enter your password.' }),
            errors.password?.message,
          )}
        />
        <Button type="submit" variant="contained" size="large" loading={isSubmitting}>
          Sign in
        </Button>
      </Stack>
    </form>
  );
}
