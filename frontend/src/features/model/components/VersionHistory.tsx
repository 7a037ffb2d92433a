import { useState } from 'react';
import Alert from '@mui/material/Alert';
import Button from '@mui/material/Button';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import Typography from '@mui/material/Typography';
import type { ModelSettingsVersion } from '@kinpath/contracts';
import { ConfirmDialog } from '../../../components/ConfirmDialog';
import { VisuallyHidden } from '../../advising/components/EstimateCells';
import { useRestoreVersion } from '../api/model';
import { describeSettings } from '../settings-words';
import { formatWhen } from '../format';

/** Every settings version, newest first; any earlier one can be put back in force. */
export function VersionHistory({
  versions,
  inForce,
}: {
  versions: ModelSettingsVersion[];
  inForce: number;
}) {
  const restore = useRestoreVersion();
  const [asked, setAsked] = useState<ModelSettingsVersion | null>(null);
  const [done, setDone] = useState<string | null>(null);

  const confirm = async () => {
    if (!asked) return;
    try {
      const result = await restore.mutateAsync(asked.version);
      setDone(
        result.version === inForce
          ? `Version ${asked.version} holds the settings already in force; nothing changed.`
          : `Version ${asked.version} restored as version ${result.version}.`,
      );
      setAsked(null);
    } catch {
      // Shown in the dialog.
    }
  };

  return (
    <>
      {done ? (
        <Alert severity="success" role="status" sx={{ mb: 2 }}>
          {done}
        </Alert>
      ) : null}
      <TableContainer component={Paper} variant="outlined">
        <Table size="small" aria-label="Settings versions">
          <TableHead>
            <TableRow>
              <TableCell align="right">Version</TableCell>
              <TableCell>Saved</TableCell>
              <TableCell>By</TableCell>
              <TableCell>Settings</TableCell>
              <TableCell>Note</TableCell>
              <TableCell>
                <VisuallyHidden>Action</VisuallyHidden>
              </TableCell>
            </TableRow>
          </TableHead>
          <TableBody>
            {versions.map((v) => (
              <TableRow key={v.version}>
                <TableCell align="right" className="kp-figures">
                  {v.version}
                </TableCell>
                <TableCell>{formatWhen(v.createdAt)}</TableCell>
                <TableCell>{v.createdBy ?? 'Installation'}</TableCell>
                <TableCell sx={{ maxWidth: 360 }}>{describeSettings(v.settings)}</TableCell>
                <TableCell>{v.note ?? ''}</TableCell>
                <TableCell>
                  {v.version === inForce ? (
                    <Typography variant="body2" component="span" sx={{ fontWeight: 600 }}>
                      In force
                    </Typography>
                  ) : (
                    <Button
                      size="small"
                      onClick={() => {
                        restore.reset();
                        setDone(null);
                        setAsked(v);
                      }}
                      aria-label={`Restore version ${v.version}`}
                    >
                      Restore
                    </Button>
                  )}
                </TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      </TableContainer>
      <ConfirmDialog
        open={asked !== null}
        title={`Restore version ${asked?.version ?? ''}?`}
        confirmLabel="Restore"
        onConfirm={() => void confirm()}
        onCancel={() => setAsked(null)}
        busy={restore.isPending}
        error={restore.isError ? 'The version could not be restored; nothing was changed.' : null}
      >
        Its settings become a new version in force, and advisors’ estimates use them from now on:{' '}
        {asked ? describeSettings(asked.settings) : ''}.
      </ConfirmDialog>
    </>
  );
}
