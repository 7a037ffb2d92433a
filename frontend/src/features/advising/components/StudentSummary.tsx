import Box from '@mui/material/Box';
import type { StudentHeader } from '@kinpath/contracts';
import { fixed, statusLabel } from '../format';

/** The facts an advisor checks first, computed from the records by the server. */
export function StudentSummary({ student }: { student: StudentHeader }) {
  const facts: Array<[string, string]> = [
    ['Program', student.program ?? 'not recorded'],
    ['Status', statusLabel(student.status)],
    ['Entry term', student.entryTerm ?? 'not recorded'],
    ['Credits earned', fixed(student.creditsEarned, 1)],
    ['Grade-point average', fixed(student.gradePointAverage, 2)],
    ['Attempts on record', String(student.attempts)],
  ];
  return (
    <Box
      component="dl"
      sx={{
        m: 0,
        display: 'grid',
        gridTemplateColumns: { xs: 'repeat(2, minmax(0, 1fr))', md: 'repeat(6, max-content)' },
        columnGap: 4,
        rowGap: 1.5,
      }}
    >
      {facts.map(([label, value]) => (
        <Box key={label}>
          <Box component="dt" sx={{ fontSize: '0.8rem', color: 'text.secondary' }}>
            {label}
          </Box>
          <Box
            component="dd"
            className="kp-figures"
            sx={{ m: 0, fontWeight: 700, fontSize: '1.05rem' }}
          >
            {value}
          </Box>
        </Box>
      ))}
    </Box>
  );
}
