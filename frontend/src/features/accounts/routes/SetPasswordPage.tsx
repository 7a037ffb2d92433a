import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link as RouterLink, useParams } from 'react-router';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Link from '@mui/material/Link';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { useMutation, useQuery } from '@tanstack/react-query';
import {
  PASSWORD_MIN_LENGTH,
  type AcceptInvitationRequest,
  type LinkCheckResponse,
  type PasswordSetResponse,
} from '@kinpath/contracts';
import { apiClient, apiMessage, httpStatus } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { PublicFrame } from './PublicFrame';

interface PasswordFields {
  password: string;
  repeat: string;
}

const MODES = {
  invitation: {
    title: 'Set up your account',
    lead: 'Choose the password you will sign in with.',
    url: '/auth/invitations/accept',
    checkUrl: '/auth/invitations/check',
    submit: 'Set password',
    again: 'Ask the person who invited you to send a new invitation.',
  },
  reset: {
    title: 'Choose a new password',
    lead: 'Signing in with the new password ends your other sessions.',
    url: '/auth/password-reset/confirm',
    checkUrl: '/auth/password-reset/check',
    submit: 'Save new password',
    again: 'Ask for a new link from the sign-in page.',
  },
} as const;

function failureMessage(error: unknown): string {
  if (httpStatus(error) === 429)
    return 'Too many attempts from here. Wait a minute, then try again.';
  return apiMessage(error) ?? 'The password could not be saved. Try again in a moment.';
}

/** The page an invitation or reset link opens: a new password, typed twice. */
export function SetPasswordPage({ mode }: { mode: keyof typeof MODES }) {
  const { token = '' } = useParams();
  const texts = MODES[mode];
  const [done, setDone] = useState<PasswordSetResponse | null>(null);
  const save = useMutation({
    mutationFn: async (request: AcceptInvitationRequest) =>
      (await apiClient.post<PasswordSetResponse>(texts.url, request)).data,
  });
  // The link is checked on arrival, so a spent or broken one says so before a password is typed.
  const link = useQuery({
    queryKey: ['account-link', mode, token],
    queryFn: async () => (await apiClient.post<LinkCheckResponse>(texts.checkUrl, { token })).data,
    retry: false,
    staleTime: Infinity,
  });
  const {
    register,
    handleSubmit,
    getValues,
    formState: { errors, isSubmitting },
  } = useForm<PasswordFields>({ defaultValues: { password: '', repeat: '' } });

  const onSubmit = handleSubmit(async ({ password }) => {
    try {
      setDone(await save.mutateAsync({ token, password }));
    } catch {
      // Shown below.
    }
  });

  if (done) {
    return (
      <PublicFrame title={texts.title} lead={texts.lead}>
        <Stack spacing={2}>
          <Alert severity="success" role="status">
            {done.message}
          </Alert>
          <Button component={RouterLink} to="/sign-in" variant="contained">
            Go to sign-in
          </Button>
        </Stack>
      </PublicFrame>
    );
  }

  if (link.isPending) {
    return (
      <PublicFrame title={texts.title} lead={texts.lead}>
        <Typography role="status">Checking the link…</Typography>
      </PublicFrame>
    );
  }

  if (link.isError) {
    const refused = httpStatus(link.error) === 400;
    return (
      <PublicFrame title={texts.title} lead={texts.lead}>
        <Stack spacing={2}>
          <Alert severity="error" role="alert">
            {refused
              ? `${apiMessage(link.error) ?? 'This link cannot be used.'} ${texts.again}`
              : 'The link could not be checked. Reload the page to try again.'}
          </Alert>
          {mode === 'reset' ? (
            <Button component={RouterLink} to="/forgot-password" variant="contained">
              Ask for a new link
            </Button>
          ) : null}
          <Link component={RouterLink} to="/sign-in">
            Back to sign-in
          </Link>
        </Stack>
      </PublicFrame>
    );
  }

  return (
    <PublicFrame title={texts.title} lead={texts.lead}>
      <form onSubmit={onSubmit} noValidate>
        <Stack spacing={2.25}>
          {save.isError ? (
            <Alert severity="error" role="alert">
              {failureMessage(save.error)}
            </Alert>
          ) : null}
          <Typography>
            For <strong>{link.data.email}</strong>
          </Typography>
          <TextField
            label="New password"
            type="password"
            autoComplete="new-password"
            {...fieldProps(
              register('password', {
                required: 'Enter a password.',
                minLength: {
                  value: PASSWORD_MIN_LENGTH,
                  message: `Use at least ${PASSWORD_MIN_LENGTH} characters.`,
                },
              }),
              errors.password?.message,
            )}
            helperText={
              errors.password?.message ??
              `At least ${PASSWORD_MIN_LENGTH} characters. A phrase of several words is easy to remember; common passwords are refused.`
            }
          />
          <TextField
            label="Repeat the password"
            type="password"
            autoComplete="new-password"
            {...fieldProps(
              register('repeat', {
                validate: (value) =>
                  value === getValues('password') ? true : 'The two passwords are not the same.',
              }),
              errors.repeat?.message,
            )}
          />
          <Button type="submit" variant="contained" size="large" loading={isSubmitting}>
            {texts.submit}
          </Button>
          <Link component={RouterLink} to="/sign-in">
            Back to sign-in
          </Link>
        </Stack>
      </form>
    </PublicFrame>
  );
}

export const InvitationPage = () => <SetPasswordPage mode="invitation" />;
export const ResetPasswordPage = () => <SetPasswordPage mode="reset" />;
