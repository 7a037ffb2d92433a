import { useId, useState } from 'react';
import { useForm } from 'react-hook-form';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Dialog from '@mui/material/Dialog';
import DialogActions from '@mui/material/DialogActions';
import DialogContent from '@mui/material/DialogContent';
import DialogContentText from '@mui/material/DialogContentText';
import DialogTitle from '@mui/material/DialogTitle';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import { ROLE_LABELS, ROLES, type Role, type UserAccount } from '@kinpath/contracts';
import { apiMessage } from '../../../lib/api-client';
import { fieldProps } from '../../../lib/form';
import { useResendInvitation, useRevokeInvitation, useUpdateUser } from '../api/users';
import { DepartmentField, departmentRule, useDepartmentCodes } from './DepartmentField';

interface RoleFields {
  role: Role;
  department: string;
}

function RoleDialog({ user, onClose }: { user: UserAccount; onClose: () => void }) {
  const titleId = useId();
  const update = useUpdateUser();
  const {
    register,
    handleSubmit,
    watch,
    formState: { errors, isSubmitting },
  } = useForm<RoleFields>({
    defaultValues: { role: user.role, department: user.department ?? '' },
  });
  const role = watch('role');
  const codes = useDepartmentCodes();
  const roleField = fieldProps(register('role'), errors.role?.message);

  const onSubmit = handleSubmit(async (values) => {
    try {
      await update.mutateAsync({
        id: user.id,
        role: values.role,
        department: values.role === 'department_head' ? values.department : null,
      });
      onClose();
    } catch {
      // Shown below.
    }
  });

  return (
    <Dialog open onClose={onClose} aria-labelledby={titleId}>
      <form onSubmit={onSubmit} noValidate>
        <DialogTitle id={titleId}>Change the role of {user.displayName}</DialogTitle>
        <DialogContent>
          <Stack spacing={2} sx={{ pt: 1, minWidth: { sm: 360 } }}>
            {update.isError ? (
              <Alert severity="error" role="alert">
                {apiMessage(update.error) ?? 'The role could not be changed.'}
              </Alert>
            ) : null}
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
                  shouldUnregister: true,
                  validate: departmentRule(codes),
                })}
                error={errors.department?.message}
              />
            ) : null}
          </Stack>
        </DialogContent>
        <DialogActions>
          <Button onClick={onClose}>Cancel</Button>
          <Button type="submit" variant="contained" loading={isSubmitting}>
            Save role
          </Button>
        </DialogActions>
      </form>
    </Dialog>
  );
}

/** Deactivation signs the person out everywhere at once, so it is confirmed first. */
function DeactivateDialog({
  user,
  onCancel,
  onConfirm,
}: {
  user: UserAccount;
  onCancel: () => void;
  onConfirm: () => void;
}) {
  const titleId = useId();
  const textId = useId();
  return (
    <Dialog open onClose={onCancel} aria-labelledby={titleId} aria-describedby={textId}>
      <DialogTitle id={titleId}>Deactivate {user.displayName}?</DialogTitle>
      <DialogContent>
        <DialogContentText id={textId}>
          {user.displayName} ({user.email}) is signed out everywhere at once and cannot sign in
          until an administrator reactivates the account. Notes and the audit trail stay as they
          are.
        </DialogContentText>
      </DialogContent>
      <DialogActions>
        <Button onClick={onCancel} autoFocus>
          Cancel
        </Button>
        <Button variant="contained" color="warning" onClick={onConfirm}>
          Deactivate
        </Button>
      </DialogActions>
    </Dialog>
  );
}

/** What an admin can do with one account, from its row in the table. */
export function AccountActions({
  user,
  onDone,
}: {
  user: UserAccount;
  onDone: (message: string, error?: boolean) => void;
}) {
  const [editing, setEditing] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const update = useUpdateUser();
  const resend = useResendInvitation();
  const revoke = useRevokeInvitation();
  const who = `${user.displayName} (${user.email})`;

  const run = async (action: () => Promise<unknown>, success: string) => {
    try {
      await action();
      onDone(success);
    } catch (error) {
      onDone(apiMessage(error) ?? 'That did not work. Try again in a moment.', true);
    }
  };

  return (
    <Stack direction="row" spacing={1} sx={{ flexWrap: 'wrap', justifyContent: 'flex-end' }}>
      {user.pendingInvitation ? (
        <>
          <Button
            size="small"
            aria-label={`Resend invitation to ${who}`}
            onClick={() =>
              run(() => resend.mutateAsync(user.id), `A new invitation went to ${user.email}.`)
            }
          >
            Resend invitation
          </Button>
          <Button
            size="small"
            color="warning"
            aria-label={`Revoke invitation of ${who}`}
            onClick={() =>
              run(
                () => revoke.mutateAsync(user.id),
                `The invitation link of ${user.email} no longer works.`,
              )
            }
          >
            Revoke
          </Button>
        </>
      ) : (
        <>
          <Button
            size="small"
            aria-label={`Change role of ${who}`}
            onClick={() => setEditing(true)}
          >
            Change role
          </Button>
          <Button
            size="small"
            color={user.active ? 'warning' : 'primary'}
            aria-label={`${user.active ? 'Deactivate' : 'Reactivate'} ${who}`}
            onClick={() =>
              user.active
                ? setConfirming(true)
                : run(
                    () => update.mutateAsync({ id: user.id, active: true }),
                    `${user.displayName} can sign in again.`,
                  )
            }
          >
            {user.active ? 'Deactivate' : 'Reactivate'}
          </Button>
        </>
      )}
      {confirming ? (
        <DeactivateDialog
          user={user}
          onCancel={() => setConfirming(false)}
          onConfirm={() => {
            setConfirming(false);
            void run(
              () => update.mutateAsync({ id: user.id, active: false }),
              `${user.displayName} is deactivated and signed out everywhere.`,
            );
          }}
        />
      ) : null}
      {editing ? (
        <RoleDialog
          user={user}
          onClose={() => {
            setEditing(false);
          }}
        />
      ) : null}
    </Stack>
  );
}
