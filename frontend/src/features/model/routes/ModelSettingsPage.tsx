import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Link from '@mui/material/Link';
import Paper from '@mui/material/Paper';
import Typography from '@mui/material/Typography';
import { Link as RouterLink } from 'react-router';
import { PageHeader } from '../../../components/PageHeader';
import { PAGES } from '../../../app/pages';
import { useModelSettings, useSettingsVersions } from '../api/model';
import { SettingsForm } from '../components/SettingsForm';
import { VersionHistory } from '../components/VersionHistory';
import { formatWhen } from '../format';

export function ModelSettingsPage() {
  const current = useModelSettings();
  const versions = useSettingsVersions();
  return (
    <>
      <PageHeader
        title="Model settings"
        lead={
          <>
            How kin are found and how estimates are made from them. Try a change in a{' '}
            <Link component={RouterLink} to={PAGES.backtests.path}>
              backtest
            </Link>{' '}
            before advisors rely on it.
          </>
        }
      />
      {current.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading the settings…
        </Typography>
      ) : current.isError ? (
        <Alert severity="error" role="alert">
          The model settings could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <>
          <Paper
            variant="outlined"
            component="section"
            aria-labelledby="in-force"
            sx={{ p: { xs: 2, sm: 3 }, mb: 4 }}
          >
            <Typography id="in-force" variant="h2" sx={{ mb: 0.5 }}>
              Version {current.data.version} in force
            </Typography>
            <Typography variant="body2" sx={{ color: 'text.secondary', mb: 2.5 }}>
              Saved {formatWhen(current.data.createdAt)} by{' '}
              {current.data.createdBy ?? 'the installation (the defaults)'}. Saving a change makes a
              new version; advisors see which version their estimates come from.
            </Typography>
            <SettingsForm current={current.data} />
          </Paper>
          <Box component="section" aria-labelledby="history">
            <Typography id="history" variant="h2" sx={{ mb: 1.5 }}>
              Version history
            </Typography>
            {versions.isPending ? (
              <Typography role="status" sx={{ color: 'text.secondary' }}>
                Loading the history…
              </Typography>
            ) : versions.isError ? (
              <Alert severity="error" role="alert">
                The version history could not be loaded.
              </Alert>
            ) : (
              <VersionHistory versions={versions.data} inForce={current.data.version} />
            )}
          </Box>
        </>
      )}
    </>
  );
}
