import { useId, useState } from 'react';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Dialog from '@mui/material/Dialog';
import DialogActions from '@mui/material/DialogActions';
import DialogContent from '@mui/material/DialogContent';
import DialogTitle from '@mui/material/DialogTitle';
import Stack from '@mui/material/Stack';
import TextField from '@mui/material/TextField';
import type { CreatedApiToken } from '@kinpath/contracts';

/** The one time the secret is shown: closing the dialog forgets it. */
export function SecretDialog({
  created,
  onClose,
}: {
  created: CreatedApiToken;
  onClose: () => void;
}) {
  const titleId = useId();
  const [copied, setCopied] = useState<'yes' | 'failed' | null>(null);
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(created.secret);
      setCopied('yes');
    } catch {
      setCopied('failed');
    }
  };
  return (
    <Dialog open onClose={onClose} aria-labelledby={titleId} maxWidth="sm" fullWidth>
      <DialogTitle id={titleId}>Copy the secret of “{created.token.name}” now</DialogTitle>
      <DialogContent>
        <Stack spacing={2} sx={{ pt: 1 }}>
          <Alert severity="warning">
            This is the only time Kinpath shows this secret; it keeps only a fingerprint of it.
            Store it where the script runs. If it is lost, revoke the token and make a new one.
          </Alert>
          <TextField
            label="Secret"
            value={created.secret}
            fullWidth
            slotProps={{
              htmlInput: { readOnly: true, spellCheck: false },
            }}
            onFocus={(event) => event.target.select()}
          />
          {copied ? (
            <Alert severity={copied === 'yes' ? 'success' : 'error'} role="status">
              {copied === 'yes'
                ? 'The secret is on the clipboard.'
                : 'The browser did not allow copying: select the secret and copy it by hand.'}
            </Alert>
          ) : null}
        </Stack>
      </DialogContent>
      <DialogActions>
        <Button onClick={() => void copy()}>Copy secret</Button>
        <Button variant="contained" onClick={onClose}>
          I have stored it
        </Button>
      </DialogActions>
    </Dialog>
  );
}
