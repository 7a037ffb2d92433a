import { Link as RouterLink } from 'react-router';
import Alert from '@mui/material/Alert';
import List from '@mui/material/List';
import ListItemButton from '@mui/material/ListItemButton';
import ListItemText from '@mui/material/ListItemText';
import Typography from '@mui/material/Typography';
import { useRecentStudents } from '../api/students';
import { dateTime, statusLabel } from '../format';
import { studentPagePath } from '../paths';

/** This advisor's latest lookups, named by program and entry term: a number on screen would linger. */
export function RecentLookups() {
  const recent = useRecentStudents();

  if (recent.isPending) {
    return (
      <Typography role="status" sx={{ color: 'text.secondary' }}>
        Loading your recent lookups…
      </Typography>
    );
  }
  if (recent.isError) {
    return (
      <Alert severity="warning" role="status">
        Your recent lookups could not be loaded. Looking a student up still works.
      </Alert>
    );
  }
  if (recent.data.length === 0) {
    return (
      <Typography sx={{ color: 'text.secondary' }}>
        No lookups yet. Students you look up appear here, by program and entry term.
      </Typography>
    );
  }
  return (
    <List dense disablePadding sx={{ maxWidth: 560 }}>
      {recent.data.map((student) => (
        <li key={student.ref}>
          <ListItemButton
            component={RouterLink}
            to={studentPagePath(student.ref)}
            sx={{ borderRadius: 1, border: 1, borderColor: 'divider', mb: 0.75 }}
          >
            <ListItemText
              primary={`${student.program ?? 'Program not recorded'} · entered ${
                student.entryTerm ?? 'term not recorded'
              }`}
              secondary={`${statusLabel(student.status)} · looked up ${dateTime(student.lookedUpAt)}`}
              slotProps={{
                primary: { sx: { fontWeight: 700 } },
                secondary: { className: 'kp-figures' },
              }}
            />
          </ListItemButton>
        </li>
      ))}
    </List>
  );
}
